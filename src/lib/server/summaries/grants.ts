// Landlord grants: which landlord member sees which field of the farm, and on what lease. Only
// managers read or change them; every change is one transaction and one audit entry per grant
// (grant.created, grant.changed, grant.revoked) naming the field and the share.
import { and, asc, eq } from 'drizzle-orm';
import { error } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { auditLog, fields, landlordGrants, memberships, users } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import { grantChanges, type GrantChanges, type GrantTerms } from '$lib/summaries/grant-form';

export type LandlordGrants = {
	userId: string;
	name: string;
	email: string;
	grants: (GrantTerms & { fieldName: string })[];
};

function assertManages(actor: Actor) {
	// Routes check first; the data layer refuses on its own so no caller can forget.
	if (!may(actor.role, 'grants.manage')) error(403, 'Only the farm’s managers may change what landlords see.');
}

/** The farm's landlord members, by name, each with their grants (by field name). */
export async function listLandlords(actor: Actor): Promise<LandlordGrants[]> {
	assertManages(actor);
	const people = await db
		.select({ userId: users.id, name: users.name, email: users.email })
		.from(memberships)
		.innerJoin(users, eq(users.id, memberships.userId))
		.where(and(eq(memberships.farmId, actor.farm.id), eq(memberships.role, 'landlord')))
		.orderBy(asc(users.name));
	const grants = await db
		.select({ userId: landlordGrants.userId, fieldId: landlordGrants.fieldId, fieldName: fields.name, cropSharePercent: landlordGrants.cropSharePercent })
		.from(landlordGrants)
		.innerJoin(fields, eq(fields.id, landlordGrants.fieldId))
		.where(eq(landlordGrants.farmId, actor.farm.id))
		.orderBy(asc(fields.name));
	return people.map((p) => ({ ...p, grants: grants.filter((g) => g.userId === p.userId).map(({ userId: _u, ...g }) => g) }));
}

/** One landlord member of the farm, or null (not a member, or not a landlord here). */
export async function getLandlord(actor: Actor, userId: string): Promise<LandlordGrants | null> {
	return (await listLandlords(actor)).find((l) => l.userId === userId) ?? null;
}

/**
 * Makes a landlord's grants exactly `wanted` (fields checked against the farm's by the caller's
 * form parser): new grants inserted, changed leases updated, unticked fields revoked. Returns
 * what changed, or null when `userId` is not a landlord member of this farm.
 */
export async function saveGrants(actor: Actor, userId: string, wanted: GrantTerms[]): Promise<GrantChanges | null> {
	assertManages(actor);
	const landlord = await getLandlord(actor, userId);
	if (!landlord) return null;
	const names = new Map((await db.select({ id: fields.id, name: fields.name }).from(fields).where(eq(fields.farmId, actor.farm.id))).map((f) => [f.id, f.name]));
	for (const g of wanted) if (!names.has(g.fieldId)) throw new Error(`saveGrants: field ${g.fieldId} is not in farm ${actor.farm.id}`);
	return db.transaction(async (tx) => {
		// Read inside the transaction, locked, so two managers saving at once cannot both insert.
		const stored = await tx
			.select({ fieldId: landlordGrants.fieldId, cropSharePercent: landlordGrants.cropSharePercent })
			.from(landlordGrants)
			.where(and(eq(landlordGrants.farmId, actor.farm.id), eq(landlordGrants.userId, userId)))
			.for('update');
		const changes = grantChanges(stored, wanted);
		const scope = (fieldId: string) => and(eq(landlordGrants.farmId, actor.farm.id), eq(landlordGrants.userId, userId), eq(landlordGrants.fieldId, fieldId));
		if (changes.created.length) {
			await tx.insert(landlordGrants).values(changes.created.map((g) => ({ farmId: actor.farm.id, userId, fieldId: g.fieldId, cropSharePercent: g.cropSharePercent })));
		}
		for (const c of changes.changed) await tx.update(landlordGrants).set({ cropSharePercent: c.to }).where(scope(c.fieldId));
		for (const r of changes.revoked) await tx.delete(landlordGrants).where(scope(r.fieldId));
		const base = { farmId: actor.farm.id, actorId: actor.user.id, targetType: 'user', targetId: userId };
		const who = { landlord: landlord.name, landlordEmail: landlord.email };
		const entries = [
			...changes.created.map((g) => ({ ...base, action: 'grant.created', detail: { ...who, fieldId: g.fieldId, field: names.get(g.fieldId), cropSharePercent: g.cropSharePercent } })),
			...changes.changed.map((c) => ({ ...base, action: 'grant.changed', detail: { ...who, fieldId: c.fieldId, field: names.get(c.fieldId), cropSharePercentFrom: c.from, cropSharePercentTo: c.to } })),
			...changes.revoked.map((g) => ({ ...base, action: 'grant.revoked', detail: { ...who, fieldId: g.fieldId, field: names.get(g.fieldId), cropSharePercent: g.cropSharePercent } }))
		];
		if (entries.length) await tx.insert(auditLog).values(entries);
		return changes;
	});
}
