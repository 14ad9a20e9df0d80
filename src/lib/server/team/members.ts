// Members of a farm: list, change a role, remove. The caller has checked `team.manage`; every
// query here is scoped by the actor's farm, so another farm's member is "not found".
import { and, asc, eq, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { auditLog, landlordGrants, memberships, roles, users, type Role } from '$lib/server/db/schema';
import { invalidateUserSessions } from '$lib/server/auth/session';
import { problem, type Outcome, type TeamActor } from './outcome';

export type Member = { userId: string; name: string; email: string; role: Role; since: Date };

export function listMembers(farmId: string): Promise<Member[]> {
	return db
		.select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
		.from(memberships)
		.innerJoin(users, eq(users.id, memberships.userId))
		.where(eq(memberships.farmId, farmId))
		.orderBy(asc(users.name));
}

export const isRole = (value: unknown): value is Role => typeof value === 'string' && (roles as readonly string[]).includes(value);

const lastManager = 'is the last manager of this farm. Make someone else a manager first, so the farm is never left without one.';

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/**
 * The membership row locked for this change, and whether another manager remains. Locking the
 * farm's manager rows too means two managers demoting each other at once cannot both succeed.
 */
async function lockMembership(tx: Tx, farmId: string, userId: string) {
	const rows = await tx.execute<{ user_id: string; role: Role; name: string; email: string }>(sql`
		select m.user_id, m.role, u.name, u.email from memberships m join users u on u.id = m.user_id
		where m.farm_id = ${farmId} and (m.user_id = ${userId} or m.role = 'manager')
		order by m.user_id for update of m`);
	const target = rows.find((r) => r.user_id === userId) ?? null;
	const otherManagers = rows.filter((r) => r.role === 'manager' && r.user_id !== userId).length;
	return { target, otherManagers };
}

export async function changeRole(actor: TeamActor, userId: string, to: unknown): Promise<Outcome<{ from: Role; to: Role; name: string }>> {
	if (!isRole(to)) return problem(400, 'Choose a role: manager, agronomist, operator or landlord.');
	return db.transaction(async (tx) => {
		const { target, otherManagers } = await lockMembership(tx, actor.farm.id, userId);
		if (!target) return problem(404, 'No such member in this farm.');
		if (target.role === to) return { ok: true as const, from: target.role, to, name: target.name };
		if (target.role === 'manager' && otherManagers === 0) return problem(409, `${target.name} ${lastManager}`);
		await tx.update(memberships).set({ role: to }).where(and(eq(memberships.farmId, actor.farm.id), eq(memberships.userId, userId)));
		await tx.insert(auditLog).values({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'membership.role_changed',
			targetType: 'user',
			targetId: userId,
			detail: { name: target.name, email: target.email, from: target.role, to }
		});
		return { ok: true as const, from: target.role, to, name: target.name };
	});
}

/**
 * Takes a person out of the farm: the membership, their landlord grants here, and every session
 * they have (a session is not per farm, and pages already open must not keep working).
 */
export async function removeMember(actor: TeamActor, userId: string): Promise<Outcome<{ name: string; grantsRemoved: number }>> {
	const outcome = await db.transaction(async (tx) => {
		const { target, otherManagers } = await lockMembership(tx, actor.farm.id, userId);
		if (!target) return problem(404, 'No such member in this farm.');
		if (target.role === 'manager' && otherManagers === 0) return problem(409, `${target.name} ${lastManager}`);
		const grants = await tx
			.delete(landlordGrants)
			.where(and(eq(landlordGrants.farmId, actor.farm.id), eq(landlordGrants.userId, userId)))
			.returning({ fieldId: landlordGrants.fieldId });
		await tx.delete(memberships).where(and(eq(memberships.farmId, actor.farm.id), eq(memberships.userId, userId)));
		await tx.insert(auditLog).values({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'membership.removed',
			targetType: 'user',
			targetId: userId,
			detail: { name: target.name, email: target.email, from: target.role, grantsRemoved: grants.map((g) => g.fieldId) }
		});
		return { ok: true as const, name: target.name, grantsRemoved: grants.length };
	});
	// After the commit: a session ended before it could be re-validated against the old membership.
	if (outcome.ok) await invalidateUserSessions(userId);
	return outcome;
}

