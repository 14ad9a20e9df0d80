import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { beforeAll, expect, test } from 'vitest';
import { exists, pathOf, put, read, rawStoreDir, TooLargeError } from './raw-store';

beforeAll(() => {
	process.env.PATCHBOOK_DATA_DIR = mkdtempSync(join(tmpdir(), 'pb-store-'));
});

test('files are stored under the SHA-256 of their bytes (FIPS 180-4, via node:crypto) and read back whole', async () => {
	const bytes = Buffer.from('time,lat,lon\n2026-05-04T10:00:00Z,47.1,-118.3\n'.repeat(1000));
	const stored = await put(Readable.from([bytes.subarray(0, 5000), bytes.subarray(5000)]), 1e6);
	expect(stored.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
	expect(stored.sizeBytes).toBe(bytes.length);
	expect(readFileSync(pathOf(stored.sha256)).equals(bytes)).toBe(true);
	const chunks: Buffer[] = [];
	for await (const c of read(stored.sha256, 4096)) chunks.push(Buffer.from(c));
	expect(Buffer.concat(chunks).equals(bytes)).toBe(true);
	expect(await exists(stored.sha256)).toBe(true);
});

test('a file over the limit is refused and leaves nothing behind', async () => {
	const big = Readable.from([Buffer.alloc(3000), Buffer.alloc(3000)]);
	await expect(put(big, 4000)).rejects.toThrow(TooLargeError);
	expect(readdirSync(join(rawStoreDir(), 'tmp'))).toEqual([]);
});

test('only hex SHA-256 names reach the disk', () => {
	expect(() => pathOf('../../etc/passwd')).toThrow('not a sha256');
});
