import { and, asc, eq } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { farms, memberships, users, type Role } from '$lib/server/db/schema';

export async function membershipFor(userId: string, slug: string) {
	const rows = await db
		.select({ role: memberships.role, farm: { id: farms.id, slug: farms.slug, name: farms.name, currency: farms.currency } })
		.from(memberships)
		.innerJoin(farms, eq(farms.id, memberships.farmId))
		.where(and(eq(memberships.userId, userId), eq(farms.slug, slug)));
	return rows[0] ?? null;
}

/** Every farm the user belongs to, for the farm switcher. */
export function listForUser(userId: string) {
	return db
		.select({ slug: farms.slug, name: farms.name, role: memberships.role, id: farms.id })
		.from(memberships)
		.innerJoin(farms, eq(farms.id, memberships.farmId))
		.where(eq(memberships.userId, userId))
		.orderBy(asc(farms.name));
}

export function members(farmId: string) {
	return db
		.select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
		.from(memberships)
		.innerJoin(users, eq(users.id, memberships.userId))
		.where(eq(memberships.farmId, farmId))
		.orderBy(asc(users.name));
}

export async function rememberLastFarm(userId: string, farmId: string) {
	await db.update(users).set({ lastFarmId: farmId }).where(eq(users.id, userId));
}

export type FarmSummary = { slug: string; name: string; role: Role; id: string };
