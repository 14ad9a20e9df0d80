import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { fieldMap, fieldSummary, pickSeason, summarySeasons } from '$lib/server/summaries/season-summary';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'summaries');
	// Scoped to the farm and, for a landlord, to their grants: anything else looks missing.
	const field = await fields.get(actor, event.params.field);
	if (!field) error(404, 'No such field in this farm.');
	const seasons = await summarySeasons(actor);
	const season = pickSeason(seasons, event.url.searchParams.get('season'));
	if (season === null) error(404, 'No season has been logged on this farm yet.');
	const map = await fieldMap(actor, field, season);
	return {
		seasons,
		season,
		summary: await fieldSummary(actor, field, season),
		map: { svg: map.svg, span: map.span, cellSizeM: map.cellSizeM },
		units: actor.user.units
	};
};
