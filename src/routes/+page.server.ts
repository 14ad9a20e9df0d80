import { redirect } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import * as farms from '$lib/server/farms';
import { db } from '$lib/server/db';
import { users } from '$lib/server/db/schema';
import { eq } from 'drizzle-orm';
import type { PageServerLoad } from './$types';

// The front door: the farm used last, else the first farm, else a page that says so.
export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const mine = await farms.listForUser(user.id);
	if (mine.length === 0) return { noFarm: true };
	const [row] = await db.select({ lastFarmId: users.lastFarmId }).from(users).where(eq(users.id, user.id));
	const farm = mine.find((f) => f.id === row?.lastFarmId) ?? mine[0];
	redirect(303, `/${farm.slug}`);
};
