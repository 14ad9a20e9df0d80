import { requireRole } from '$lib/server/auth/guard';
import * as farms from '$lib/server/farms';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'team');
	return { members: await farms.members(actor.farm.id) };
};
