// The audit log as CSV (RFC 4180 through the exports' writer: CRLF, formula-looking text escaped).
// Times in UTC ISO 8601 so a spreadsheet sorts them; the detail as JSON for whoever needs all of it.
import { toCsv } from '$lib/export/csv';

export type AuditCsvRow = { at: Date; actorName: string | null; actorEmail: string | null; action: string; sentence: string; detail: Record<string, unknown> | null };

export function auditCsv(rows: AuditCsvRow[]): string {
	return toCsv(
		['time_utc', 'person', 'email', 'action', 'what_happened', 'detail_json'],
		rows.map((r) => [r.at.toISOString(), r.actorName ?? '', r.actorEmail ?? '', r.action, r.sentence, r.detail ? JSON.stringify(r.detail) : ''])
	);
}
