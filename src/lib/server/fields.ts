import { and, asc, eq, inArray } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { fields, landlordGrants } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';

/** The fields the actor may see: the farm's, or for a landlord only the granted ones. */
export function visibleFieldIds(actor: Actor) {
	return db
		.select({ id: landlordGrants.fieldId })
		.from(landlordGrants)
		.where(and(eq(landlordGrants.farmId, actor.farm.id), eq(landlordGrants.userId, actor.user.id)));
}

export function list(actor: Actor) {
	const scope =
		actor.role === 'landlord'
			? and(eq(fields.farmId, actor.farm.id), inArray(fields.id, visibleFieldIds(actor)))
			: eq(fields.farmId, actor.farm.id);
	return db
		.select({ id: fields.id, name: fields.name })
		.from(fields)
		.where(scope)
		.orderBy(asc(fields.name));
}
