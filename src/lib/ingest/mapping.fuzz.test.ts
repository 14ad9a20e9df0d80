// Property-based fuzzing of the column mapper (detectMapping) the upload screen runs on every
// log's header and first rows. Property: it returns a mapping whose columns are all headers of
// the file, never throws, and stays within CASE_MS even for very long header names and cells
// (its regular expressions must not backtrack badly). More runs:
// FUZZ_RUNS=5000 npx vitest run src/lib/ingest/mapping.fuzz.test.ts
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { bounded, fuzz, headOf, nastyNumber } from './fuzz-support';
import { detectMapping, mappedColumns } from './mapping';

const [realHeader, ...realRows] = headOf('sample-data/logs/sample-two-fields.csv', 12).split('\n').map((l) => l.split(','));
const headerWords = fc.constantFrom(...realHeader, 'lat', 'Longitude (deg)', 'Speed [km/h]', 'rate_gal_ac', 'time', 'date', 'x', 'y', 'nozzle_1', 'Section 2', '((((', '[[[', 'lat lat lat', '');
const header = fc.oneof(headerWords, fc.string({ maxLength: 30 }), fc.constantFrom('('.repeat(5000), 'a'.repeat(20000) + '!', ' speed'.repeat(3000), '[' + 'x'.repeat(10000)));
const cell = fc.oneof(nastyNumber, fc.string({ maxLength: 20 }), fc.constantFrom(...realRows.flat()), fc.constantFrom('2026-04-13T16:05:00' + '0'.repeat(5000), '1'.repeat(10000), '0,' + '5'.repeat(9000)));

describe('column mapper under fuzzing', () => {
	test('random and hostile headers and rows', { timeout: 60_000 }, async () => {
		await fuzz(
			'mapping/detectMapping',
			fc.array(header, { maxLength: 14 }).chain((headers) => fc.tuple(fc.constant(headers), fc.array(fc.array(cell, { maxLength: headers.length + 2 }), { maxLength: 20 }))),
			300,
			([headers, rows]) =>
				bounded('header', () => {
					const mapping = detectMapping(headers, rows);
					for (const { column } of mappedColumns(mapping)) expect(headers).toContain(column);
				})
		);
	});

	test('the real header with columns shuffled, dropped and duplicated still maps only real columns', { timeout: 60_000 }, async () => {
		await fuzz('mapping/real-header-shuffled', fc.shuffledSubarray(realHeader.map((_, i) => i)).chain((idx) => fc.tuple(fc.constant(idx), fc.array(fc.nat({ max: realHeader.length - 1 }), { maxLength: 3 }))), 200, ([idx, dup]) => {
			const cols = [...idx, ...dup];
			const headers = cols.map((i) => realHeader[i]);
			const rows = realRows.map((r) => cols.map((i) => r[i] ?? ''));
			return bounded('header', () => {
				const mapping = detectMapping(headers, rows);
				for (const { column } of mappedColumns(mapping)) expect(headers).toContain(column);
			});
		});
	});
});
