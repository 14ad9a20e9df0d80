import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { summariesPdf } from '$lib/server/summaries/pdf';
import { fieldSummary, pickSeason, summarySeasons } from '$lib/server/summaries/season-summary';
import type { RequestHandler } from './$types';

/** ?season=[&field=]: every field the viewer may see, or one, one A4 page each. */
export const GET: RequestHandler = async (event) => {
	// A download beside a page: signed out, it sends you to sign in and back, like the page.
	const actor = await requireRole(event, 'summaries');
	const seasons = await summarySeasons(actor);
	const season = pickSeason(seasons, event.url.searchParams.get('season'));
	if (season === null) error(404, 'No season has been logged on this farm yet.');
	const fieldId = event.url.searchParams.get('field');
	let wanted;
	if (fieldId) {
		// Scoped like the page: another farm's field, or one not granted, is missing.
		const field = /^[0-9a-f-]{36}$/i.test(fieldId) ? await fields.get(actor, fieldId) : null;
		if (!field) error(404, 'No such field in this farm.');
		wanted = [field];
	} else {
		const visible = await fields.list(actor);
		wanted = (await Promise.all(visible.map((f) => fields.get(actor, f.id)))).filter((f) => f !== null);
	}
	const pages = [];
	for (const field of wanted) pages.push({ field, summary: await fieldSummary(actor, field, season) });
	const pdf = await summariesPdf(actor, pages, actor.farm.currency);
	const name = `season-summary-${actor.farm.slug}-${season}${fieldId && wanted[0] ? `-${wanted[0].name.toLowerCase().replace(/[^a-z0-9]+/g, '-')}` : ''}.pdf`;
	return new Response(new Uint8Array(pdf), {
		headers: {
			'Content-Type': 'application/pdf',
			'Content-Disposition': `attachment; filename="${name}"`,
			'Cache-Control': 'private, no-store'
		}
	});
};
