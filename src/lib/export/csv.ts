// CSV as RFC 4180 describes it: CRLF between records, a header line, fields holding commas,
// quotes or line breaks quoted and their quotes doubled (papaparse's writer). Text that a
// spreadsheet would run as a formula (=, +, -, @ first) is prefixed with a quote mark, so a field
// named "=HYPERLINK(...)" stays text.
import Papa from 'papaparse';

export type CsvValue = string | number | boolean | null | undefined;

export function toCsv(header: string[], rows: CsvValue[][]): string {
	return Papa.unparse(
		{ fields: header, data: rows.map((r) => r.map((v) => (v === null || v === undefined ? '' : typeof v === 'boolean' ? (v ? 1 : 0) : v))) },
		{ newline: '\r\n', escapeFormulae: true }
	) + '\r\n';
}
