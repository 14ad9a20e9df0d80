// Application quality: golden files (fixtures/quality/in -> out; `vitest -u` rewrites out/) and
// the same fixtures' figures checked by hand. Fixtures lie on the equator, where a degree of
// longitude is 111,195.08 m on the mean sphere the cleaning step measures with.
import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { assessQuality, FLAG, flagKinds, type QualityLimits } from './quality';
import type { FixColumns } from './types';

type Fixture = {
	about: string;
	limits: QualityLimits;
	fixes: { timeS: number[]; lng: number[]; lat: number[]; master?: number[]; isStart?: number[]; speedMPerS?: number[]; boomHeightM?: number[]; pressurePa?: number[] };
};

const dir = new URL('./fixtures/quality/', import.meta.url);
const load = (name: string): Fixture => JSON.parse(readFileSync(new URL(`in/${name}`, dir), 'utf8'));

function fixesOf(f: Fixture['fixes']): FixColumns {
	const n = f.timeS.length;
	return {
		count: n,
		timeS: Float64Array.from(f.timeS),
		lng: Float64Array.from(f.lng),
		lat: Float64Array.from(f.lat),
		spray: { kind: 'fraction', fraction: new Float32Array(n).fill(1) },
		sourceRow: Uint32Array.from({ length: n }, (_, i) => i + 2),
		master: f.master && Uint8Array.from(f.master),
		isStart: f.isStart && Uint8Array.from(f.isStart),
		speedMPerS: f.speedMPerS && Float32Array.from(f.speedMPerS),
		boomHeightM: f.boomHeightM && Float32Array.from(f.boomHeightM),
		pressurePa: f.pressurePa && Float32Array.from(f.pressurePa)
	};
}

const run = (name: string) => {
	const f = load(name);
	return assessQuality(fixesOf(f.fixes), f.limits);
};

describe('golden files', () => {
	for (const file of readdirSync(new URL('in/', dir))) {
		test(file, async () => {
			const { summary, runs } = run(file);
			const rounded = JSON.stringify({ summary, runs }, (_, v) => (typeof v === 'number' ? Math.round(v * 1e6) / 1e6 : v), 1);
			await expect(`${rounded}\n`).toMatchFileSnapshot(`./fixtures/quality/out/${file}`);
		});
	}
});

describe('figures by hand', () => {
	test('speed over the machine limit and boom height outside its band, as shares of the distance sprayed', () => {
		const { summary, runs } = run('speed-and-height.json');
		expect(summary.sprayingDistanceM).toBeCloseTo(50, 4);
		expect(summary.speed).toMatchObject({ status: 'checked', source: 'logged', sharePercent: expect.closeTo(30, 3), max: 6.5 });
		expect(summary.height).toMatchObject({ status: 'checked', sharePercent: expect.closeTo(20, 3), min: 0.5 });
		expect(summary.pressure).toEqual({ status: 'not-logged' });
		expect(summary.gaps).toEqual({ count: 0, seconds: 0, distanceM: 0 });
		// Two stretches: the high boom over the first 10 m, the fast 15 m (both straight: 2 points each).
		expect(runs.map((r) => [flagKinds(r.f), r.c.length])).toEqual([
			[['height'], 2],
			[['speed'], 2]
		]);
	});

	test('speed from positions, a gap while spraying, low pressure; nothing counts with the master off', () => {
		const { summary, runs } = run('gaps-and-pressure.json');
		expect(summary.sprayingDistanceM).toBeCloseTo(26, 4);
		expect(summary.speed).toMatchObject({ status: 'checked', source: 'positions', flaggedM: expect.closeTo(14, 3) });
		if (summary.speed.status !== 'checked') throw new Error('unchecked');
		expect(summary.speed.sharePercent).toBeCloseTo((100 * 14) / 26, 4);
		expect(summary.pressure).toMatchObject({ status: 'checked', flaggedM: expect.closeTo(4, 3), min: 1.5e5, max: 3e5 });
		expect(summary.gaps.count).toBe(1);
		expect(summary.gaps.seconds).toBe(5);
		expect(summary.gaps.distanceM).toBeCloseTo(35, 4);
		expect(summary.height).toEqual({ status: 'not-logged' });
		expect(runs.map((r) => r.f)).toEqual([FLAG.pressure, FLAG.gap, FLAG.speed]);
	});

	test('without limits the range seen is kept and nothing is flagged', () => {
		const { summary, runs } = run('no-limits.json');
		expect(summary.speed).toMatchObject({ status: 'no-limit', min: 5, max: 5 });
		// The last fix starts no interval, so its 0.6 m is not among the heights sprayed at.
		expect(summary.height).toMatchObject({ status: 'no-limit', min: expect.closeTo(0.45, 6), max: expect.closeTo(0.62, 6) });
		expect(runs).toEqual([]);
	});

	test("a field's share of a log: time outside the field is neither a gap nor distance", () => {
		const { summary } = run('field-share.json');
		expect(summary.sprayingDistanceM).toBeCloseTo(20, 4);
		expect(summary.gaps.count).toBe(0);
		expect(summary.speed).toMatchObject({ status: 'checked', flaggedM: expect.closeTo(10, 3), sharePercent: expect.closeTo(50, 3) });
	});

	test('a long flagged stretch is simplified and rounded to 1e-7 degrees', () => {
		const n = 2001;
		const fixes: FixColumns = {
			count: n,
			timeS: Float64Array.from({ length: n }, (_, i) => i * 0.2),
			lng: Float64Array.from({ length: n }, (_, i) => -118.3 + i * 1.3e-5),
			lat: Float64Array.from({ length: n }, (_, i) => 47.1 + 1e-9 * Math.sin(i)),
			spray: { kind: 'fraction', fraction: new Float32Array(n).fill(1) },
			sourceRow: new Uint32Array(n),
			speedMPerS: new Float32Array(n).fill(7)
		};
		const { runs } = assessQuality(fixes, { maxSpeedMPerS: 5, targetHeightM: null, heightToleranceM: null, pressureMinPa: null, pressureMaxPa: null });
		expect(runs).toHaveLength(1);
		expect(runs[0].c).toHaveLength(2);
		expect(runs[0].c[1]).toEqual([Math.round((-118.3 + 2000 * 1.3e-5) * 1e7) / 1e7, 47.1]);
	});
});
