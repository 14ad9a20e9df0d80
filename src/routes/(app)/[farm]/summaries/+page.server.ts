import { may, requireRole } from '$lib/server/auth/guard';
import { pickSeason, seasonSummaries, summarySeasons } from '$lib/server/summaries/season-summary';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'summaries');
	const seasons = await summarySeasons(actor);
	const season = pickSeason(seasons, event.url.searchParams.get('season'));
	const asked = event.url.searchParams.get('season');
	return {
		seasons,
		season,
		problem: asked !== null && season !== Number(asked) ? `Season “${asked}” has no applications on these fields; showing ${season ?? 'none'}.` : null,
		summaries: season === null ? [] : await seasonSummaries(actor, season),
		units: actor.user.units,
		canManageGrants: may(actor.role, 'grants.manage')
	};
};
