import { may, requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'fields');
	return { fields: await fields.list(actor), canEdit: may(actor.role, 'fields.edit') };
};
