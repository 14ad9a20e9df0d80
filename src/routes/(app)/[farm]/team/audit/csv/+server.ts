import { requireRole } from '$lib/server/auth/guard';
import { auditAll, readAuditFilter } from '$lib/server/team/audit-log';
import { auditCsv } from '$lib/team/audit-csv';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'team', { api: true });
	const rows = await auditAll(actor.farm.id, readAuditFilter(event.url.searchParams));
	return new Response(auditCsv(rows), {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="${actor.farm.slug}-audit-log.csv"`,
			'Cache-Control': 'no-store'
		}
	});
};
