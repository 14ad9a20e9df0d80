import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { zoneSummaryCsv } from '$lib/compute/zone-summary-csv';
import { attachment, fileSlug } from '$lib/server/zones/downloads';
import { fieldZoneSummary, ZoneFiguresProblem } from '$lib/server/zones/summary';
import type { RequestHandler } from './$types';

/** The zone table of a field for ?season= as CSV (RFC 4180), in the user's units; money only for those who may see prices. */
export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'zones.view', { api: true });
	const raw = event.url.searchParams.get('season');
	const season = raw === null ? undefined : Number(raw);
	if (season !== undefined && !Number.isInteger(season)) error(400, `“${raw}” is not a season.`);
	let summary;
	try {
		summary = await fieldZoneSummary(actor, event.params.id, season);
	} catch (e) {
		if (e instanceof ZoneFiguresProblem) error(409, e.message);
		throw e;
	}
	if (!summary) error(404, 'No such field in this farm.');
	if (season !== undefined && !summary.seasons.includes(season)) error(404, `The field has no applications in ${season}.`);
	const body = zoneSummaryCsv(summary, { units: actor.user.units, currency: actor.farm.currency, seesMoney: summary.seesMoney });
	const name = `${fileSlug(summary.fieldName)}-zones-${summary.season}.csv`;
	return new Response(body, { headers: attachment(name, 'text/csv; charset=utf-8; header=present') });
};
