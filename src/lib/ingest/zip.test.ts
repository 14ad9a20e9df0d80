import { readFileSync } from 'node:fs';
import { strToU8, zipSync } from 'fflate';
import { describe, expect, test } from 'vitest';
import { IngestError } from './issues';
import { unsafeNameReason, unzipSafe } from './zip';

function expectIngestError(run: () => unknown, pattern: RegExp) {
	try {
		run();
	} catch (err) {
		expect(err).toBeInstanceOf(IngestError);
		expect((err as IngestError).issue.file).toBe('upload.zip');
		expect((err as Error).message).toMatch(pattern);
		return;
	}
	throw new Error('expected an IngestError');
}

describe('unzipSafe', () => {
	test('round-trips entries written by fflate zipSync (stored and deflated)', () => {
		const text = 'invented field notes\n'.repeat(200);
		const zip = zipSync({ 'a.txt': strToU8(text), 'dir/b.bin': [new Uint8Array([1, 2, 3]), { level: 0 }] });
		const out = unzipSafe('upload.zip', zip);
		expect(new TextDecoder().decode(out.get('a.txt'))).toBe(text);
		expect([...out.get('dir/b.bin')!]).toEqual([1, 2, 3]);
	});

	test("refuses an entry named with ../ and names it", () => {
		const zip = zipSync({ '../evil.shp': new Uint8Array([1]) });
		expectIngestError(() => unzipSafe('upload.zip', zip), /'\.\.\/evil\.shp' climbs out of its folder/);
	});

	test('refuses absolute paths and drive letters', () => {
		expect(unsafeNameReason('/etc/passwd')).toMatch(/absolute/);
		expect(unsafeNameReason('C:\\x.shp')).toMatch(/drive letter/);
		expect(unsafeNameReason('a/b..c.shp')).toBeNull();
	});

	test('refuses a zip that inflates far beyond its size (64 MB of zeros)', () => {
		const zeros = new Uint8Array(64 * 1024 * 1024);
		const zip = zipSync({ 'zeros.dbf': zeros }, { level: 9 });
		expect(zip.length).toBeLessThan(zeros.length / 100);
		expectIngestError(() => unzipSafe('upload.zip', zip), /'zeros\.dbf' expands \d+ times .*zip bomb/);
	});

	test('counts real output: a header that understates the size is caught while inflating', () => {
		const big = new Uint8Array(4 * 1024 * 1024).fill(7);
		const zip = zipSync({ 'big.shp': big }, { level: 9 });
		// Rewrite the declared uncompressed size in the central directory (APPNOTE 4.3.12, offset 24).
		const view = new DataView(zip.buffer);
		let cd = -1;
		for (let i = zip.length - 22; i >= 0; i--) if (view.getUint32(i, true) === 0x06054b50) (cd = view.getUint32(i + 16, true)), (i = -1);
		view.setUint32(cd + 24, 1000, true);
		expectIngestError(() => unzipSafe('upload.zip', zip, { maxRatio: 1e9 }), /'big\.shp' inflates past its declared size of 1000 bytes/);
	});

	test('caps the total inflated size', () => {
		const zip = zipSync({ 'a.csv': new Uint8Array(3 * 1024 * 1024).fill(65) }, { level: 1 });
		expectIngestError(() => unzipSafe('upload.zip', zip, { maxTotalBytes: 2 * 1024 * 1024, maxRatio: 1e9 }), /unzips to more than 2 MB/);
	});

	test('caps the entry count', () => {
		const files: Record<string, Uint8Array> = {};
		for (let i = 0; i < 12; i++) files[`f${i}.txt`] = new Uint8Array([i]);
		expectIngestError(() => unzipSafe('upload.zip', zipSync(files), { maxEntries: 10 }), /holds 12 entries; at most 10/);
	});

	test('refuses bytes that are not a zip', () => {
		expectIngestError(() => unzipSafe('upload.zip', strToU8('time,lat,lon\n')), /is not a zip archive/);
	});

	// Shrunk counterexample from boundaries.fuzz.test.ts: 15 bytes cut from the middle of the
	// central directory made the name/extra lengths point past the end (a raw RangeError before).
	test('a central directory whose entry runs past the end of the file is called damaged', () => {
		const zip = new Uint8Array(readFileSync('sample-data/fixtures/boundary-wgs84.zip'));
		const cut = new Uint8Array(zip.length - 15);
		cut.set(zip.subarray(0, 664));
		cut.set(zip.subarray(679), 664);
		expectIngestError(() => unzipSafe('upload.zip', cut), /^upload\.zip: has a damaged zip directory at entry \d+$/);
	});
});
