import { redirect } from '@sveltejs/kit';
import { requireMember, requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import * as figures from '$lib/server/figures';
import * as uploads from '$lib/server/uploads';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const member = await requireMember(event);
	// A landlord's farm starts at their season summaries.
	if (member.role === 'landlord') redirect(303, `/${member.farm.slug}/summaries`);
	const actor = await requireRole(event, 'overview');
	const all = await figures.listApplications(actor);
	const seasons = [...new Set(all.map((a) => a.season))].sort((a, b) => b - a);
	const asked = Number(event.url.searchParams.get('season'));
	const season = seasons.includes(asked) ? asked : (seasons[0] ?? null);
	const rows = figures.bySeason(all.filter((a) => a.season === season));
	return {
		fields: await fields.list(actor),
		seasons,
		season,
		rows,
		recentUploads: (await uploads.list(actor, 5)).map(({ report: _r, ...u }) => u)
	};
};
