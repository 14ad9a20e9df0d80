// CSV as RFC 4180 defines it: records end in CRLF (the last one too), fields holding a comma, a
// double quote, CR or LF are quoted, and a double quote inside a field is doubled. A field that
// starts with =, +, - or @ is text a spreadsheet could run as a formula (OWASP "CSV injection"):
// it gets a leading apostrophe, unless it is a plain number.

export type CsvValue = string | number | null | undefined;

const NUMBER = /^[-+]?\d+(\.\d+)?([eE][-+]?\d+)?$/;

/** One field: empty for null, undefined and non-finite numbers. */
export function csvField(value: CsvValue): string {
	if (value === null || value === undefined) return '';
	if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
	let text = value;
	if (/^[=+\-@\t\r]/.test(text) && !NUMBER.test(text)) text = `'${text}`;
	return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** A whole CSV document: a header record, then the rows, every record ending in CRLF. */
export function toCsv(header: string[], rows: CsvValue[][]): string {
	for (const [i, row] of rows.entries()) {
		if (row.length !== header.length) throw new Error(`csv: row ${i + 1} has ${row.length} fields, the header ${header.length}`);
	}
	return [header, ...rows].map((r) => r.map(csvField).join(',') + '\r\n').join('');
}

/** A number rounded to `decimals` for a CSV cell, without a trailing "-0". */
export function fixed(value: number | null | undefined, decimals: number): number | null {
	if (value === null || value === undefined || !Number.isFinite(value)) return null;
	const r = Number(value.toFixed(decimals));
	return Object.is(r, -0) ? 0 : r;
}
