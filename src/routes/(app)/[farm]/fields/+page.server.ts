import { may, requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'fields');
	const [rows, map] = await Promise.all([fields.list(actor), fields.featureCollection(actor)]);
	return { fields: rows, map, canEdit: may(actor.role, 'fields.edit') };
};
