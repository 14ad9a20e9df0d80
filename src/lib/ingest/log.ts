// Entry points for as-applied logs: sniff the format, show the header for mapping, read it all.
import { readCsvHeader, readCsvLog, type Delimiter } from './csv';
import { geojsonPointTable, previewOf, readPointTable, type PointTable } from './geojson-points';
import { IngestError, toIssue, type IngestIssue } from './issues';
import { detectMapping, type ColumnMapping } from './mapping';
import type { ReadLogOptions, ReadLogResult } from './rows';
import { shapefilePointTable } from './shapefile-points';
import { collectBytes, toChunks, type TextEncodingName } from './text';
import { looksLikeZip } from './zip';

export type LogKind = 'csv' | 'geojson' | 'shapefile';
export type ByteSource = AsyncIterable<Uint8Array> | Iterable<Uint8Array> | Uint8Array;

/** GeoJSON and zipped shapefiles are parsed whole; this caps what is held in memory for them. */
export const MAX_WHOLE_FILE_BYTES = 512 * 1024 * 1024;

export type LogHeader = {
	kind: LogKind;
	headers: string[];
	preview: string[][];
	suggested: ColumnMapping;
	delimiter?: Delimiter;
	encoding: TextEncodingName;
	warnings: IngestIssue[];
};

/** Kind from the name, or from the first bytes when the name says nothing. */
export function logKindOf(fileName: string, firstBytes: Uint8Array): LogKind {
	const lower = fileName.toLowerCase();
	if (lower.endsWith('.zip') || looksLikeZip(firstBytes)) return 'shapefile';
	if (lower.endsWith('.geojson') || lower.endsWith('.json')) return 'geojson';
	let i = 0;
	if (firstBytes[0] === 0xef && firstBytes[1] === 0xbb && firstBytes[2] === 0xbf) i = 3;
	while (i < firstBytes.length && /\s/.test(String.fromCharCode(firstBytes[i]))) i++;
	if (firstBytes[i] === 0x7b) return 'geojson';
	return 'csv';
}

/** Puts back the first chunk after sniffing it. */
async function* prepend(first: Uint8Array, rest: AsyncIterator<Uint8Array>): AsyncIterable<Uint8Array> {
	let done = false;
	try {
		yield first;
		for (;;) {
			const r = await rest.next();
			if (r.done) return void (done = true);
			yield r.value;
		}
	} finally {
		if (!done) await rest.return?.();
	}
}

async function sniff(source: ByteSource): Promise<{ first: Uint8Array; chunks: AsyncIterable<Uint8Array> }> {
	const it = toChunks(source)[Symbol.asyncIterator]();
	let first: Uint8Array = new Uint8Array(0);
	for (;;) {
		const r = await it.next();
		if (r.done) break;
		if (r.value.length) {
			first = r.value;
			break;
		}
	}
	return { first, chunks: prepend(first, it) };
}

function tableHeader(kind: LogKind, table: PointTable): LogHeader {
	const preview = previewOf(table);
	const suggested = detectMapping(table.attributeNames, preview);
	// Point features carry their position in the geometry; attributes named lat/lon are a
	// second opinion the user may still choose.
	suggested.position = { kind: 'geometry', crs: null };
	return { kind, headers: table.attributeNames, preview, suggested, encoding: 'utf-8', warnings: table.warnings };
}

/** Header names, the first rows and a suggested mapping. Throws IngestError when the file
 * cannot be read at all (empty, not a log, unsafe zip). */
export async function readLogHeader(fileName: string, source: ByteSource): Promise<LogHeader> {
	const { first, chunks } = await sniff(source);
	if (!first.length) throw new IngestError(fileName, 'is empty');
	const kind = logKindOf(fileName, first);
	if (kind === 'csv') {
		const h = await readCsvHeader(chunks);
		if (!h.headers.length) throw new IngestError(fileName, 'is empty');
		const warnings: IngestIssue[] = h.preview.length ? [] : [{ file: fileName, row: null, column: null, message: 'has a header but no data rows' }];
		return { kind, headers: h.headers, preview: h.preview, suggested: h.suggested, delimiter: h.delimiter, encoding: h.encoding, warnings };
	}
	const bytes = await wholeFile(fileName, chunks);
	return tableHeader(kind, kind === 'geojson' ? geojsonPointTable(fileName, bytes) : shapefilePointTable(fileName, bytes));
}

async function wholeFile(fileName: string, chunks: AsyncIterable<Uint8Array>) {
	try {
		return await collectBytes(chunks, MAX_WHOLE_FILE_BYTES);
	} catch {
		throw new IngestError(fileName, `is larger than ${MAX_WHOLE_FILE_BYTES / 1024 / 1024} MB; upload it as CSV, which is read as a stream`);
	}
}

/** Reads a whole log into FixColumns with the given mapping. Never throws: problems come back
 * in `errors` (with fixes null) or `warnings`. */
export async function readLog(
	fileName: string,
	source: ByteSource,
	mapping: ColumnMapping,
	opts: ReadLogOptions = {}
): Promise<ReadLogResult> {
	try {
		const { first, chunks } = await sniff(source);
		if (!first.length) return fail(fileName, 'is empty');
		const kind = logKindOf(fileName, first);
		if (kind === 'csv') {
			const { delimiter: _d, encoding: _e, ...result } = await readCsvLog(fileName, chunks, mapping, opts);
			return result;
		}
		const bytes = await wholeFile(fileName, chunks);
		const table = kind === 'geojson' ? geojsonPointTable(fileName, bytes) : shapefilePointTable(fileName, bytes);
		return readPointTable(fileName, table, mapping, opts);
	} catch (err) {
		return { fixes: null, extras: {}, warnings: [], errors: [toIssue(fileName, err)] };
	}
}

function fail(file: string, message: string): ReadLogResult {
	return { fixes: null, extras: {}, warnings: [], errors: [{ file, row: null, column: null, message }] };
}
