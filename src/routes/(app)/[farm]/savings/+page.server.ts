import { requireRole } from '$lib/server/auth/guard';
import * as savings from '$lib/server/savings';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'savings');
	return { report: await savings.reportFor(actor, event.url.searchParams) };
};
