// Helpers for integration tests: real rows in the test database, and a minimal request event.
import { isHttpError, isRedirect, type RequestEvent } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { farms, fields, landlordGrants, memberships, users, type Role } from '$lib/server/db/schema';
import { hashPassword } from '$lib/server/auth/password';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import type { SessionUser } from '$lib/server/auth/session';

let counter = 0;
const unique = () => `${Date.now().toString(36)}${(counter++).toString(36)}`;

export async function makeUser(password = 'correct horse battery'): Promise<SessionUser & { password: string }> {
	const id = `u-${unique()}`;
	const user = { id, email: `${id}@test.example`, name: `User ${id}`, units: 'metric' as const };
	await db.insert(users).values({ ...user, passwordHash: await hashPassword(password) });
	return { ...user, password };
}

export async function makeFarm() {
	const slug = `farm-${unique()}`;
	const [farm] = await db.insert(farms).values({ slug, name: `Farm ${slug}` }).returning();
	return farm;
}

export async function join(farmId: string, userId: string, role: Role) {
	await db.insert(memberships).values({ farmId, userId, role });
}

export async function makeField(farmId: string, name: string) {
	const [field] = await db
		.insert(fields)
		.values({
			farmId,
			name,
			...fieldGeometryColumns({ type: 'Polygon', coordinates: [[[0, 0], [0.01, 0], [0.01, 0.01], [0, 0]]] })
		})
		.returning();
	return field;
}

export async function grant(farmId: string, userId: string, fieldId: string) {
	await db.insert(landlordGrants).values({ farmId, userId, fieldId });
}

/** Just enough of a RequestEvent for the guard: a user, route params and a URL. */
export function eventFor(user: SessionUser | null, params: Record<string, string>, path = '/') {
	return {
		locals: { user, session: null },
		params,
		url: new URL(`http://127.0.0.1${path}`)
	} as unknown as RequestEvent;
}

/** The HTTP status a guarded call ends in: 200 when it returns, else its error's or redirect's. */
export async function statusOf(promise: Promise<unknown>): Promise<number> {
	try {
		await promise;
		return 200;
	} catch (e) {
		if (isHttpError(e) || isRedirect(e)) return e.status;
		throw e;
	}
}
