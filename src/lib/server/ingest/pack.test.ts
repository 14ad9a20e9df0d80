import { expect, test } from 'vitest';
import type { FixColumns } from '$lib/compute/types';
import { selectFixes } from '$lib/compute/clean-fixes';
import { concatFixes, packFixes, unpackFixes } from './pack';

function log(n: number, t0: number): FixColumns {
	const bits = new Uint32Array(n * 5);
	for (let i = 0; i < bits.length; i++) bits[i] = (i * 2654435761) >>> 0;
	return {
		count: n,
		timeS: Float64Array.from({ length: n }, (_, i) => t0 + i * 0.2),
		lng: Float64Array.from({ length: n }, (_, i) => -118.3 + i * 1e-6),
		lat: Float64Array.from({ length: n }, (_, i) => 47.1 + i * 1e-6),
		sourceRow: Uint32Array.from({ length: n }, (_, i) => i + 2),
		spray: { kind: 'nozzles', nozzleCount: 144, nozzleWords: 5, bits },
		rateLPerM2: Float32Array.from({ length: n }, () => 0.01)
	};
}

test('packing and unpacking keeps every column bit for bit', () => {
	const f = log(1001, 1.7e9);
	const back = unpackFixes(packFixes(f));
	expect(back.count).toBe(1001);
	expect(Array.from(back.timeS)).toEqual(Array.from(f.timeS));
	expect(Array.from(back.lat)).toEqual(Array.from(f.lat));
	expect(Array.from(back.sourceRow)).toEqual(Array.from(f.sourceRow));
	expect(back.spray.kind).toBe('nozzles');
	if (back.spray.kind === 'nozzles' && f.spray.kind === 'nozzles') expect(Array.from(back.spray.bits)).toEqual(Array.from(f.spray.bits));
	expect(back.rateLPerM2?.[7]).toBeCloseTo(0.01, 6);
	expect(back.flowLPerS).toBeUndefined();
});

test('selecting and joining logs orders fixes by time and carries nozzle words along', () => {
	const a = log(10, 100);
	const b = log(10, 100.1); // interleaves with a
	const picked = selectFixes(a, Uint32Array.from([9, 0]));
	expect(Array.from(picked.sourceRow)).toEqual([11, 2]);
	const joined = concatFixes([a, b]);
	expect(joined.count).toBe(20);
	for (let i = 1; i < joined.count; i++) expect(joined.timeS[i]).toBeGreaterThanOrEqual(joined.timeS[i - 1]);
	if (joined.spray.kind !== 'nozzles' || b.spray.kind !== 'nozzles') throw new Error('kind');
	// b's first fix (t=100.1) lands between a's first two and carries its own nozzle words.
	const at = Array.from(joined.timeS).indexOf(100.1);
	expect(at).toBe(1);
	expect(Array.from(joined.spray.bits.subarray(at * 5, at * 5 + 5))).toEqual(Array.from(b.spray.bits.subarray(0, 5)));
});

test('interval starts survive packing and joining; a part without them starts at every fix', () => {
	const a = { ...log(4, 100), isStart: Uint8Array.from([1, 0, 1, 0]) };
	expect(Array.from(unpackFixes(packFixes(a)).isStart!)).toEqual([1, 0, 1, 0]);
	const b = log(2, 100.1);
	const joined = concatFixes([a, b]);
	// Time order: a0 (100), b0 (100.1), a1 (100.2), b1 (100.3), a2, a3.
	expect(Array.from(joined.isStart!)).toEqual([1, 1, 0, 1, 1, 0]);
});

test('pressure and boom height are packed; joined with a log without them they read NaN there', () => {
	const a = { ...log(3, 100), pressurePa: Float32Array.from([3e5, 3.1e5, 2.9e5]), boomHeightM: Float32Array.from([0.5, 0.52, 0.61]) };
	const back = unpackFixes(packFixes(a));
	expect(Array.from(back.pressurePa!)).toEqual(Array.from(a.pressurePa));
	expect(Array.from(back.boomHeightM!)).toEqual(Array.from(a.boomHeightM));
	const joined = concatFixes([a, log(2, 100.1)]);
	// Time order: a0, b0, a1, b1, a2.
	expect(Array.from(joined.pressurePa!).map((v) => (Number.isNaN(v) ? 'NaN' : v))).toEqual([3e5, 'NaN', 3.1e5, 'NaN', 2.9e5]);
	expect(joined.boomHeightM!.length).toBe(5);
	expect(concatFixes([log(2, 1), log(2, 2)]).pressurePa).toBeUndefined();
});
