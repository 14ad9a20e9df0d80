// The savings table as CSV, with the same filter as the page (?season=&field=&product=).
import { requireRole } from '$lib/server/auth/guard';
import * as savings from '$lib/server/savings';
import { savingsCsv } from '$lib/savings/csv';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'savings', { api: true });
	const report = await savings.reportFor(actor, event.url.searchParams);
	const name = [actor.farm.slug, 'savings', report.filter.season ?? 'all-seasons'].join('-');
	return new Response(savingsCsv(report.rows, actor.user.units, actor.farm.currency), {
		headers: {
			// RFC 4180 registers text/csv; header=present says the first line names the columns.
			'content-type': 'text/csv; charset=utf-8; header=present',
			'content-disposition': `attachment; filename="${name}.csv"`,
			'cache-control': 'private, no-store'
		}
	});
};
