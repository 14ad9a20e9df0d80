// Property-based fuzzing of the as-applied log readers (CSV, GeoJSON points, zipped point
// shapefiles) through their real entry points, readLogHeader and readLog, with the bytes cut
// into awkward chunks as a network upload arrives. Property: a result or a clear problem naming
// the file, never a raw exception, within CASE_MS per case and HEAP_CAP_BYTES per property.
// More runs: FUZZ_RUNS=2000 npx vitest run src/lib/ingest/log.fuzz.test.ts
import fc from 'fast-check';
import { zipSync } from 'fflate';
import { describe, expect, test } from 'vitest';
import { readLog, readLogHeader } from './log';
import type { ColumnMapping } from './mapping';
import { chunked } from './testing';
import {
	bounded, byteMutation, bytesOf, CRASH_PREFIX, fixture, fuzz, headOf, mutateBytes, mutateTable, nastyNumber, textMutation, textOf, type Outcome
} from './fuzz-support';

const CSV = headOf('sample-data/logs/sample-north-flat.csv', 40);
const GEOJSON = fixture('sample-data/fixtures/log-points.geojson');
const SHP_ZIP = fixture('sample-data/fixtures/log-points.zip');

/** The header step, then (when it found columns) the full read with the suggested mapping, as
 * the upload screen does. readLog reports problems instead of throwing: a problem wrapped by
 * toIssue's generic "could not be read:" means a raw exception got that far, so it counts as a
 * crash. */
async function headerThenRead(file: string, bytes: Uint8Array, chunk: number): Promise<Outcome> {
	let mapping: ColumnMapping | null = null;
	const header = await bounded(file, async () => {
		mapping = (await readLogHeader(file, chunked(bytes, chunk))).suggested;
	});
	const fallback: ColumnMapping = {
		time: { kind: 'iso', column: 'utc_time' },
		position: { kind: 'lngLat', lng: 'boom_lon', lat: 'boom_lat' },
		spray: { kind: 'nozzles', columns: ['nozzle_states'] }
	};
	return bounded(file, async () => {
		const r = await readLog(file, chunked(bytes, chunk), mapping ?? fallback, { nozzleCount: 144 });
		for (const issue of [...r.errors, ...r.warnings]) {
			expect(issue.file).toBe(file);
			if (issue.message.startsWith(CRASH_PREFIX)) throw new Error(`raw exception reported as a problem: ${issue.message}`);
		}
		expect(r.fixes === null || r.errors.length === 0).toBe(true);
		if (r.fixes) expect(r.fixes.count).toBeGreaterThan(0);
		return r.fixes ? header : ({ kind: 'problem', message: r.errors[0]?.message ?? '' } as Outcome);
	}).then((o) => (header.kind === 'problem' ? header : o));
}

const chunk = fc.integer({ min: 1, max: 4096 });

describe('log readers under fuzzing', () => {
	test('random bytes under any name', { timeout: 60_000 }, async () => {
		await fuzz(
			'log/random-bytes',
			fc.tuple(fc.constantFrom('log.csv', 'log.geojson', 'log.zip', 'log.txt', 'noname'), fc.uint8Array({ maxLength: 2048 }), chunk),
			150,
			([name, bytes, c]) => headerThenRead(name, bytes, c)
		);
	});

	test('random text and JSON-like text', { timeout: 60_000 }, async () => {
		const text = fc.oneof(fc.string({ maxLength: 500 }), fc.json({ maxDepth: 4 }), fc.constantFrom('{', '{"type":"FeatureCollection","features":[', '[1,2]', '{"features":7}', 'null'));
		await fuzz('log/random-text', fc.tuple(fc.constantFrom('log.csv', 'log.geojson'), text, chunk), 150, ([name, t, c]) =>
			headerThenRead(name, bytesOf(t), c)
		);
	});

	test('the sample CSV log with rows, columns, delimiters and cells damaged', { timeout: 60_000 }, async () => {
		await fuzz(
			'log/csv-table-mutations',
			fc.tuple(fc.array(textMutation, { minLength: 1, maxLength: 5 }), chunk),
			150,
			([mutations, c]) => headerThenRead('north-flat.csv', bytesOf(mutateTable(CSV, mutations)), c)
		);
	});

	test('the sample CSV log with bytes damaged (truncated, flipped, spliced)', { timeout: 60_000 }, async () => {
		await fuzz('log/csv-byte-mutations', fc.tuple(fc.array(byteMutation, { minLength: 1, maxLength: 6 }), chunk), 150, ([m, c]) =>
			headerThenRead('north-flat.csv', mutateBytes(bytesOf(CSV), m), c)
		);
	});

	test('the GeoJSON points fixture with bytes damaged and numbers replaced', { timeout: 60_000 }, async () => {
		const numberRe = /-?\d+\.\d+/g;
		await fuzz(
			'log/geojson-mutations',
			fc.tuple(fc.array(byteMutation, { maxLength: 4 }), fc.option(nastyNumber, { nil: undefined }), fc.nat(), chunk),
			100,
			([m, nasty, which, c]) => {
				let text = textOf(GEOJSON);
				if (nasty !== undefined) {
					let n = 0;
					const target = which % 200;
					// JSON cannot hold NaN/Infinity as numbers: as a bare word it is invalid JSON, as text a
					// coordinate that is a string; both must come back as a problem, not a crash.
					text = text.replace(numberRe, (v) => (n++ === target ? (/^[-\d.e]+$/i.test(nasty) && nasty ? nasty : JSON.stringify(nasty)) : v));
				}
				return headerThenRead('points.geojson', mutateBytes(bytesOf(text), m), c);
			}
		);
	});

	test('the zipped point shapefile with bytes damaged, and rebuilt with entries removed or wrong', { timeout: 60_000 }, async () => {
		const { unzipSync } = await import('fflate');
		const entries = unzipSync(SHP_ZIP);
		const names = Object.keys(entries);
		await fuzz(
			'log/shapefile-mutations',
			fc.tuple(
				fc.array(byteMutation, { maxLength: 4 }),
				fc.subarray(names),
				fc.option(fc.tuple(fc.constantFrom(...names), fc.array(byteMutation, { minLength: 1, maxLength: 4 })), { nil: undefined }),
				fc.option(fc.constantFrom('../escape.shp', 'x.shp', 'other.dbf', 'a/b/c.prj', 'notes.txt'), { nil: undefined }),
				chunk
			),
			100,
			([outer, keep, inner, extra, c]) => {
				let bytes: Uint8Array;
				if (outer.length) bytes = mutateBytes(SHP_ZIP, outer);
				else {
					const files: Record<string, Uint8Array> = {};
					for (const k of keep) files[k] = inner && inner[0] === k ? mutateBytes(entries[k], inner[1]) : entries[k];
					if (extra) files[extra] = entries[names[0]];
					bytes = zipSync(files);
				}
				return headerThenRead('points.zip', bytes, c);
			}
		);
	});
});
