// Parse throughput of readLog on a generated 200k-row CSV with a 144-character nozzle column.
// Prints fixes/s; the bar asserted is loose (2-core shared machines vary +-25%, see
// coverage-notes.md) and exists to catch a slide back to whole-file parsing.
import { describe, expect, test } from 'vitest';
import { readLog } from './log';
import type { ColumnMapping } from './mapping';

const ROWS = 200_000;
const NOZZLES = 144;

function generate(): { chunks: Uint8Array[]; bytes: number } {
	const enc = new TextEncoder();
	const chunks: Uint8Array[] = [enc.encode('time,lat,lon,speed_kmh,rate_l_ha,nozzles\n')];
	let bytes = chunks[0].length;
	const t0 = Date.UTC(2024, 4, 14, 15) / 1000;
	let block = '';
	for (let i = 0; i < ROWS; i++) {
		let bits = '';
		for (let k = 0; k < NOZZLES; k++) bits += (k * 13 + i * 7) % 17 < 4 ? '1' : '0';
		block += `${new Date((t0 + i * 0.2) * 1000).toISOString()},${(38.5 + i * 1e-6).toFixed(8)},${(-98.5).toFixed(8)},10.8,50.0,${bits}\n`;
		if (block.length > 60_000 || i === ROWS - 1) {
			const c = enc.encode(block);
			chunks.push(c);
			bytes += c.length;
			block = '';
		}
	}
	return { chunks, bytes };
}

async function* stream(chunks: Uint8Array[]) {
	yield* chunks;
}

describe('readLog throughput', () => {
	test(`${ROWS} rows x ${NOZZLES} nozzles`, { timeout: 120_000 }, async () => {
		const { chunks, bytes } = generate();
		const mapping: ColumnMapping = {
			time: { kind: 'iso', column: 'time' },
			position: { kind: 'lngLat', lng: 'lon', lat: 'lat' },
			spray: { kind: 'nozzles', columns: ['nozzles'] },
			speed: { column: 'speed_kmh', unit: 'km/h' },
			rate: { column: 'rate_l_ha', unit: 'L/ha' }
		};
		const runs: number[] = [];
		let count = 0;
		for (let run = 0; run < 3; run++) {
			const start = performance.now();
			const r = await readLog('big.csv', stream(chunks), mapping, { nozzleCount: NOZZLES });
			runs.push((performance.now() - start) / 1000);
			expect(r.errors).toEqual([]);
			count = r.fixes!.count;
			if (r.fixes!.spray.kind !== 'nozzles') throw new Error('nozzles expected');
			// Row 12345, nozzle 100: the generator's own rule, recomputed here.
			const bit = (r.fixes!.spray.bits[12345 * 5 + (100 >> 5)] >>> (100 & 31)) & 1;
			expect(bit).toBe((100 * 13 + 12345 * 7) % 17 < 4 ? 1 : 0);
		}
		expect(count).toBe(ROWS);
		const median = runs.sort((a, b) => a - b)[1];
		const rate = Math.round(ROWS / median);
		console.log(`readLog: ${ROWS} fixes, ${(bytes / 1e6).toFixed(1)} MB in ${median.toFixed(2)} s (median of 3) = ${rate} fixes/s, ${(bytes / 1e6 / median).toFixed(1)} MB/s`);
		expect(rate).toBeGreaterThan(40_000);
	});
});
