// Streaming CSV reader for as-applied logs. Bytes arrive in chunks (a file streamed from disk);
// they are decoded, cut into records by papaparse's low-level Parser one chunk at a time, and
// each record goes straight into typed arrays, so neither the whole text nor all rows as
// objects are ever held (coverage-notes.md, pitfall 3).
import Papa from 'papaparse';
import type { IngestIssue } from './issues';
import { detectMapping, type ColumnMapping } from './mapping';
import { planRows, type ReadLogOptions, type ReadLogResult } from './rows';
import { ChunkDecoder, detectEncoding, SNIFF_BYTES, type TextEncodingName } from './text';

export type Delimiter = ',' | ';' | '\t' | '|';
const DELIMITERS: Delimiter[] = [';', '\t', '|', ','];
export const PREVIEW_ROWS = 20;

type Newline = '\n' | '\r\n' | '\r';

type TextStream = { encoding: TextEncodingName; hasBom: boolean; texts: AsyncIterable<string>; replaced: () => number };

/** Decodes a byte stream, deciding the encoding on the first 64 KiB (not just the first chunk). */
async function decodeStream(chunks: AsyncIterable<Uint8Array>): Promise<TextStream> {
	const it = chunks[Symbol.asyncIterator]();
	const head: Uint8Array[] = [];
	let headBytes = 0;
	let done = false;
	while (headBytes < SNIFF_BYTES) {
		const r = await it.next();
		if (r.done) {
			done = true;
			break;
		}
		head.push(r.value);
		headBytes += r.value.length;
	}
	const joined = new Uint8Array(headBytes);
	let at = 0;
	for (const h of head) joined.set(h, (at += h.length) - h.length);
	const { encoding, hasBom } = detectEncoding(joined);
	const decoder = new ChunkDecoder(encoding);
	async function* texts() {
		try {
			yield decoder.decode(joined);
			while (!done) {
				const r = await it.next();
				if (r.done) done = true;
				else yield decoder.decode(r.value);
			}
			yield decoder.end();
		} finally {
			// Stopping early (the header read) releases the source, e.g. closes a file stream.
			if (!done) await it.return?.();
		}
	}
	return { encoding, hasBom, texts: texts(), replaced: () => decoder.replaced };
}

function detectNewline(text: string): Newline {
	const n = text.indexOf('\n');
	if (n > 0 && text[n - 1] === '\r') return '\r\n';
	if (n === -1 && text.includes('\r')) return '\r';
	return '\n';
}

/** The delimiter that splits the header and the first lines into the same number of fields,
 * the most fields winning. papaparse's own guess is not used: with decimal commas and ';' it
 * ties on consistency and then prefers the comma, which splits every number in two. */
export function detectDelimiter(sample: string, newline: Newline): Delimiter {
	const lastBreak = sample.lastIndexOf(newline);
	const whole = lastBreak > 0 ? sample.slice(0, lastBreak) : sample;
	let best: Delimiter = ',';
	let bestFields = 1;
	for (const d of DELIMITERS) {
		const rows = new Papa.Parser({ delimiter: d, newline }).parse(whole, 0, false).data as string[][];
		const lines = rows.filter((r) => !(r.length === 1 && r[0] === '')).slice(0, 11);
		if (!lines.length) continue;
		const fields = lines[0].length;
		if (fields < 2 || !lines.every((r) => r.length === fields)) continue;
		if (fields > bestFields) {
			best = d;
			bestFields = fields;
		}
	}
	return best;
}

type RecordSink = (record: string[], row: number, isLast: boolean, hadTrailingNewline: boolean) => boolean | void;

/** Feeds records to `sink` in file order with their 1-based row numbers (the header is row 1).
 * Blank lines are skipped but counted. The sink returns false to stop early. */
async function streamRecords(
	text: TextStream,
	onStart: (delimiter: Delimiter, newline: Newline) => void,
	sink: RecordSink
): Promise<void> {
	let parser: InstanceType<typeof Papa.Parser> | null = null;
	let partial = '';
	let row = 0;
	let pending: string[] | null = null;
	let pendingRow = 0;
	let stopped = false;
	const emit = (records: string[][]) => {
		for (const r of records) {
			row++;
			if (r.length === 1 && r[0].trim() === '') continue;
			if (pending && sink(pending, pendingRow, false, true) === false) {
				stopped = true;
				return;
			}
			pending = r;
			pendingRow = row;
		}
	};
	for await (const t of text.texts) {
		if (!t) continue;
		const agg = partial + t;
		if (!parser) {
			const newline = detectNewline(agg);
			const delimiter = detectDelimiter(agg, newline);
			onStart(delimiter, newline);
			parser = new Papa.Parser({ delimiter, newline });
		}
		const res = parser.parse(agg, 0, true);
		partial = agg.substring(res.meta.cursor);
		emit(res.data as string[][]);
		if (stopped) return;
	}
	if (!parser) {
		onStart(',', '\n');
		return;
	}
	const endsWithNewline = partial === '';
	if (partial) emit(parser.parse(partial, 0, false).data as string[][]);
	if (stopped) return;
	if (pending) sink(pending, pendingRow, true, endsWithNewline);
}

export type CsvHeader = {
	headers: string[];
	preview: string[][];
	delimiter: Delimiter;
	encoding: TextEncodingName;
	hasBom: boolean;
	suggested: ColumnMapping;
};

/** Reads just the header and the first rows. */
export async function readCsvHeader(chunks: AsyncIterable<Uint8Array>): Promise<CsvHeader> {
	const text = await decodeStream(chunks);
	let delimiter: Delimiter = ',';
	let headers: string[] = [];
	const preview: string[][] = [];
	await streamRecords(
		text,
		(d) => (delimiter = d),
		(record) => {
			if (!headers.length) headers = record.map((h) => h.trim());
			else preview.push(record);
			return preview.length < PREVIEW_ROWS;
		}
	);
	return { headers, preview, delimiter, encoding: text.encoding, hasBom: text.hasBom, suggested: detectMapping(headers, preview) };
}

/** Reads a whole CSV log into FixColumns. Fails whole (fixes null) on any bad row. */
export async function readCsvLog(
	file: string,
	chunks: AsyncIterable<Uint8Array>,
	mapping: ColumnMapping,
	opts: ReadLogOptions
): Promise<ReadLogResult & { delimiter: Delimiter; encoding: TextEncodingName }> {
	const text = await decodeStream(chunks);
	let delimiter: Delimiter = ',';
	let headers: string[] | null = null;
	let plan: ReturnType<typeof planRows> | null = null;
	let dataRows = 0;
	const warnings: IngestIssue[] = [];
	await streamRecords(
		text,
		(d) => (delimiter = d),
		(record, row, isLast, endsWithNewline) => {
			if (!headers) {
				headers = record.map((h) => h.trim());
				plan = planRows(file, headers, mapping, opts);
				return 'plan' in plan;
			}
			if (!plan || !('plan' in plan)) return false;
			dataRows++;
			const p = plan.plan;
			const short = record.length < headers.length;
			if (isLast && dataRows > 1 && (short || !endsWithNewline)) {
				// A cut-off upload ends mid-line: the last line is dropped with a warning when it is
				// short of fields, or when, with no closing newline, only its last cell is unreadable.
				const lastColumn = headers[headers.length - 1];
				let cut = short;
				if (!short) {
					const before = p.errors.length;
					if (p.addRow(record, row)) return;
					const fresh = p.errors.slice(before);
					cut = fresh.length > 0 && fresh.every((e) => e.column !== null && e.column.split(' + ').includes(lastColumn));
					if (!cut) return;
					p.errors.length = before;
				}
				warnings.push({ file, row, column: null, message: `the last line ${short ? `has ${record.length} of ${headers.length} columns` : `ends in an unreadable '${lastColumn}' with no line end`}; the file looks cut off, so that line was left out` });
				return;
			}
			if (record.length !== headers.length) {
				p.fail(row, null, `has ${record.length} columns; the header has ${headers.length}`);
				return;
			}
			p.addRow(record, row);
		}
	);
	const base = { delimiter, encoding: text.encoding };
	if (!headers) return { ...base, fixes: null, extras: {}, warnings, errors: [{ file, row: null, column: null, message: 'is empty' }] };
	const planned = plan as unknown as ReturnType<typeof planRows>;
	if (!('plan' in planned)) return { ...base, fixes: null, extras: {}, warnings, errors: planned.errors };
	if (dataRows === 0)
		return { ...base, fixes: null, extras: {}, warnings, errors: [{ file, row: null, column: null, message: 'has a header but no data rows' }] };
	const result = planned.plan.finish();
	if (text.replaced() > 0)
		result.warnings.push({ file, row: null, column: null, message: `${text.replaced()} characters were not valid UTF-8 and were replaced` });
	return { ...base, ...result, warnings: [...warnings, ...result.warnings] };
}
