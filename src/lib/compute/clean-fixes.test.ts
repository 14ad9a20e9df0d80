import { describe, expect, test } from 'vitest';
import { cleanFixes } from './clean-fixes';
import type { FixColumns } from './types';

// Invented fixes near 47.1 N, 118.3 W: 1 m apart (about 9.6e-6 deg of latitude), 0.2 s apart.
const M_LAT = 1 / 111_200;

function log(rows: Row[]): FixColumns {
	const n = rows.length;
	const bits = new Uint32Array(n * 5);
	rows.forEach((_, i) => (bits[i * 5] = i)); // a per-row marker to follow rows through cleaning
	return {
		count: n,
		timeS: Float64Array.from(rows, (r) => r.t),
		lng: Float64Array.from(rows, (r) => r.lng ?? -118.3),
		lat: Float64Array.from(rows, (r) => r.lat ?? 47.1 + r.north * M_LAT),
		spray: { kind: 'nozzles', nozzleCount: 144, nozzleWords: 5, bits },
		rateLPerM2: Float32Array.from(rows, (_, i) => i),
		sourceRow: Uint32Array.from(rows, (_, i) => i + 2)
	};
}

type Row = { t: number; north: number; lng?: number; lat?: number };
const straight = (n: number): Row[] => Array.from({ length: n }, (_, i) => ({ t: 1000 + 0.2 * i, north: i }));

describe('cleanFixes', () => {
	test('a clean log passes through untouched', () => {
		const { fixes, report } = cleanFixes(log(straight(20)));
		expect(report).toEqual({
			input: 20,
			used: 20,
			duplicates: 0,
			outOfOrder: 0,
			jumps: 0,
			gaps: 0,
			invalidPositions: 0
		});
		expect(Array.from(fixes.sourceRow)).toEqual(Array.from({ length: 20 }, (_, i) => i + 2));
	});

	test('invalid positions are dropped and counted: NaN, out of range, and 0, 0 (no fix)', () => {
		const rows = straight(10);
		rows[2].lat = NaN;
		rows[4].lat = 95;
		rows[6] = { ...rows[6], lng: 0, lat: 0 };
		rows[7].t = NaN;
		const { fixes, report } = cleanFixes(log(rows));
		expect(report.invalidPositions).toBe(4);
		expect(report.used).toBe(6);
		expect(Array.from(fixes.sourceRow)).toEqual([2, 3, 5, 7, 10, 11]);
	});

	test('out-of-order fixes are sorted and counted; columns follow their rows', () => {
		const rows = straight(10);
		const swapped = [rows[0], rows[1], rows[3], rows[2], rows[4], rows[7], rows[5], rows[6], rows[8], rows[9]];
		const { fixes, report } = cleanFixes(log(swapped));
		// Rows 2 (after 3) and 5, 6 (after 7) came earlier than a fix before them.
		expect(report.outOfOrder).toBe(3);
		expect(Array.from(fixes.timeS)).toEqual(rows.map((r) => r.t));
		const { spray } = fixes;
		if (spray.kind !== 'nozzles') throw new Error('unreachable');
		// The row markers (nozzle word 0, rate) travelled with their times.
		expect(Array.from({ length: 10 }, (_, i) => spray.bits[i * 5])).toEqual([0, 1, 3, 2, 4, 6, 7, 5, 8, 9]);
		expect(Array.from(fixes.rateLPerM2!)).toEqual([0, 1, 3, 2, 4, 6, 7, 5, 8, 9]);
	});

	test('duplicates (same time and position) are dropped and counted; same time elsewhere is kept', () => {
		const rows = straight(6);
		const withDup = [rows[0], rows[1], rows[1], rows[2], rows[3], rows[3], rows[3], rows[4], rows[5]];
		const { report } = cleanFixes(log(withDup));
		expect(report.duplicates).toBe(3);
		expect(report.used).toBe(6);
		const sameTimeOtherPlace = [rows[0], rows[1], { ...rows[1], north: 1.05 }, rows[2]];
		expect(cleanFixes(log(sameTimeOtherPlace)).report.duplicates).toBe(0);
	});

	test('an isolated 5 km jump is removed and counted; a real move is not (60 km/h, DESIGN.md)', () => {
		const rows = straight(10);
		rows[5] = { ...rows[5], north: 5000 };
		const { fixes, report } = cleanFixes(log(rows));
		expect(report.jumps).toBe(1);
		expect(report.used).toBe(9);
		expect(Array.from(fixes.sourceRow)).not.toContain(7);
		// 10 m in 0.2 s is 180 km/h, but the log stays there: a relocation, not a spike.
		const moved = straight(10).map((r, i) => (i >= 5 ? { ...r, north: r.north + 10 } : r));
		expect(cleanFixes(log(moved)).report.jumps).toBe(0);
	});
});
