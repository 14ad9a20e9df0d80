import { and, asc, eq } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { farms, memberships, users, type Role } from '$lib/server/db/schema';
import { record } from '$lib/server/audit';

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

export const HOTSPOT_THRESHOLD_MIN = 0.5;
export const HOTSPOT_THRESHOLD_MAX = 100;

/**
 * Saves the farm's hotspot threshold (treated share, percent) and audits the change. The caller
 * checks the role (`hotspots.set`); the value is checked here so no path can store a bad one.
 */
export async function setHotspotThreshold(
	actor: { farm: { id: string }; user: { id: string } },
	percent: number
): Promise<{ ok: true; percent: number } | { error: string }> {
	if (!Number.isFinite(percent) || percent < HOTSPOT_THRESHOLD_MIN || percent > HOTSPOT_THRESHOLD_MAX) {
		return { error: `The hotspot threshold must be a number from ${HOTSPOT_THRESHOLD_MIN} to ${HOTSPOT_THRESHOLD_MAX} %.` };
	}
	const value = Math.round(percent * 10) / 10;
	const [before] = await db.select({ percent: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, actor.farm.id));
	if (!before) return { error: 'No such farm.' };
	if (before.percent !== value) {
		await db.update(farms).set({ hotspotThresholdPercent: value }).where(eq(farms.id, actor.farm.id));
		await record({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'farm.hotspot_threshold_set',
			targetType: 'farm',
			targetId: actor.farm.id,
			detail: { from: before.percent, to: value }
		});
	}
	return { ok: true, percent: value };
}
