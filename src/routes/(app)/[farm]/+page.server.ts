import { redirect } from '@sveltejs/kit';
import { requireMember, requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const member = await requireMember(event);
	// A landlord's farm starts at their season summaries.
	if (member.role === 'landlord') redirect(303, `/${member.farm.slug}/summaries`);
	const actor = await requireRole(event, 'overview');
	return { fields: await fields.list(actor) };
};
