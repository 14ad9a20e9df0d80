// Property-based fuzzing of unzipSafe, which every zipped upload (boundary shapefiles, KMZ,
// zipped point logs) goes through before shpjs sees a byte. Archives are built with fflate and
// then made to lie: declared sizes, counts, offsets and name lengths overwritten with random
// values, bytes flipped or cut. Property: entries or an IngestError naming the archive; the
// inflated total never passes the cap given; within CASE_MS; heap within HEAP_CAP_BYTES.
// More runs: FUZZ_RUNS=3000 npx vitest run src/lib/ingest/zip.fuzz.test.ts
import fc from 'fast-check';
import { zipSync } from 'fflate';
import { describe, expect, test } from 'vitest';
import { bounded, byteMutation, fuzz, mutateBytes } from './fuzz-support';
import { unzipSafe } from './zip';

const CAP = 4 * 1024 * 1024;
// '__proto__' is left out: fflate's zipSync, which builds the test archives, reads options off
// the entry object and cannot take that key (a limit of the builder, not of the reader).
const entryName = fc.oneof(fc.constantFrom('a.shp', 'a.dbf', 'dir/', 'dir/b.prj', '../x', '/abs', 'C:x', 'ü.txt'), fc.string({ minLength: 1, maxLength: 12 })).filter((k) => k !== '__proto__');
const entryData = fc.oneof(fc.uint8Array({ maxLength: 300 }), fc.integer({ min: 0, max: 2_000_000 }).map((n) => new Uint8Array(n)));
/** Overwrite a little-endian field at a random offset: a header field that lies. */
const lie = fc.record({ at: fc.nat(), width: fc.constantFrom(2, 4), value: fc.oneof(fc.constantFrom(0, 0xffff, 0xffffffff, 0x7fffffff), fc.nat()) });

describe('unzipSafe under fuzzing', () => {
	test('archives with lying headers, damage and hostile names', { timeout: 60_000 }, async () => {
		await fuzz(
			'zip/lying-archives',
			fc.tuple(fc.dictionary(entryName, entryData, { maxKeys: 5 }), fc.constantFrom(0, 6, 9), fc.array(lie, { maxLength: 3 }), fc.array(byteMutation, { maxLength: 2 })),
			200,
			([files, level, lies, damage]) => {
				const zip = zipSync(files, { level: level as 0 | 6 | 9 });
				const view = new DataView(zip.buffer, zip.byteOffset, zip.byteLength);
				for (const l of lies) {
					const at = l.at % Math.max(1, zip.length - l.width);
					if (l.width === 2) view.setUint16(at, l.value & 0xffff, true);
					else view.setUint32(at, l.value >>> 0, true);
				}
				const bytes = mutateBytes(zip, damage);
				return bounded('upload.zip', () => {
					const out = unzipSafe('upload.zip', bytes, { maxTotalBytes: CAP, maxEntries: 4 });
					let total = 0;
					for (const v of out.values()) total += v.length;
					expect(total).toBeLessThanOrEqual(CAP);
					expect(out.size).toBeLessThanOrEqual(4);
				});
			}
		);
	});
});
