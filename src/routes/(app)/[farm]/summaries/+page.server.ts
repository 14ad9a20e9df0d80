import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'summaries');
	return { fields: await fields.list(actor) };
};
