import { requireRole } from '$lib/server/auth/guard';
import { recordsCsv } from '$lib/records/csv';
import * as records from '$lib/server/records';
import { filtersFrom } from '../filters';
import type { RequestHandler } from './$types';

/** The listed records as CSV, with the list's filters. */
export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'records.view');
	const options = await records.filterOptions(actor);
	const filters = filtersFrom(event.url.searchParams, options.seasons);
	const rows = await records.list(actor, filters);
	const full = await records.getMany(actor, rows.map((r) => r.key));
	const name = `${actor.farm.slug}-records-${filters.seasonParam}.csv`;
	return new Response(recordsCsv(full, actor.user.units), {
		headers: {
			'content-type': 'text/csv; charset=utf-8; header=present',
			'content-disposition': `attachment; filename="${name}"`,
			'cache-control': 'private, no-store'
		}
	});
};
