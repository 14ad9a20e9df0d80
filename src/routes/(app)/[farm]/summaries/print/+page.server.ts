import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { fieldMap, pickSeason, seasonSummaries, summarySeasons } from '$lib/server/summaries/season-summary';
import type { PageServerLoad } from './$types';

/** Every field the viewer may see (landlords: their granted fields), one sheet each. */
export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'summaries');
	const seasons = await summarySeasons(actor);
	const season = pickSeason(seasons, event.url.searchParams.get('season'));
	if (season === null) return { season, sheets: [], units: actor.user.units };
	const summaries = await seasonSummaries(actor, season);
	const sheets = [];
	for (const summary of summaries) {
		const field = (await fields.get(actor, summary.field.id))!;
		const map = await fieldMap(actor, field, season, { maxHeightPx: 420 });
		sheets.push({ summary, map: { svg: map.svg, span: map.span, cellSizeM: map.cellSizeM } });
	}
	return { season, sheets, units: actor.user.units };
};
