import { describe, expect, test } from 'vitest';
import { computeCoverage, summariseZone, type CoverageInput, type Rings } from './coverage';
import type { BoomGeometry, GridSpec } from './types';
import { arc, buildLog, inventPatches, ring, seededRandom, type Pass } from './testing/synthetic';
import { areaInside, jstsPolygon, perCellAreas, referenceFootprints } from './testing/jsts-reference';

// Invented coordinates in a UTM-like frame (large eastings/northings keep precision honest).
const X0 = 500_000;
const Y0 = 5_200_000;

function gridFor(rings: Rings, cellSizeM = 10): GridSpec {
	const xs = rings.flatMap((r) => Array.from(r).filter((_, i) => i % 2 === 0));
	const ys = rings.flatMap((r) => Array.from(r).filter((_, i) => i % 2 === 1));
	const originX = Math.floor(Math.min(...xs) / cellSizeM) * cellSizeM;
	const originY = Math.floor(Math.min(...ys) / cellSizeM) * cellSizeM;
	return {
		proj: '+proj=utm +zone=11 +datum=WGS84 +units=m +no_defs',
		epsg: 32611,
		cellSizeM,
		originX,
		originY,
		cols: Math.ceil((Math.max(...xs) - originX) / cellSizeM),
		rows: Math.ceil((Math.max(...ys) - originY) / cellSizeM)
	};
}

const square = (x: number, y: number, w: number, hgt = w) =>
	ring([
		[x, y],
		[x + w, y],
		[x + w, y + hgt],
		[x, y + hgt]
	]);

const smallBoom: BoomGeometry = { boomWidthM: 5, nozzleCount: 10, nozzleSpacingM: 0.5 };

function straightLog(
	from: [number, number],
	headingDeg: number,
	lengthM: number,
	open: (nozzle: number, fix: number) => boolean,
	boom = smallBoom
) {
	const a = (headingDeg * Math.PI) / 180;
	const pass: Pass = [from, [from[0] + lengthM * Math.sin(a), from[1] + lengthM * Math.cos(a)]];
	const log = buildLog([pass], boom, []);
	const { spray } = log.fixes;
	if (spray.kind !== 'nozzles') throw new Error('unreachable');
	for (let i = 0; i < log.fixes.count; i++) {
		for (let q = 0; q < boom.nozzleCount; q++) {
			if (open(q, i)) spray.bits[i * spray.nozzleWords + (q >> 5)] |= 1 << (q & 31);
		}
	}
	return log;
}

describe('hand-checkable passes', () => {
	const region = [square(X0, Y0, 200, 200)];
	const grid = gridFor(region);

	test('one straight pass north, nozzles 3, 4 and 8 open: 1.5 m x 100 m sprayed', () => {
		// Hand check: covered = 5 m x 100 m; bands of 0.5 m per open nozzle, 3 and 4 adjacent.
		const log = straightLog([X0 + 50, Y0 + 10], 0, 100, (q) => q === 2 || q === 3 || q === 7);
		const input: CoverageInput = { ...log, boom: smallBoom, scaleFactor: 1, grid };
		const { totals, cells } = computeCoverage(input, region, { defaultRateLPerM2: 0.01 });
		expect(totals.coveredM2).toBeCloseTo(500, 6);
		expect(totals.sprayedM2).toBeCloseTo(150, 6);
		// 100 L/ha = 0.01 L/m2 on 150 m2 = 1.5 L.
		expect(totals.volumeL).toBeCloseTo(1.5, 6);
		expect(totals.volumeDrawnL).toBeCloseTo(1.5, 9);
		expect(totals.intervals).toBe(100);
		expect(totals.gaps).toBe(0);
		expect(totals.areaM2).toBeCloseTo(40000, 6);
		// Sprayed bands sit left of the boom centre (x = 48.5..49.5) and right (51..51.5).
		const sum = (col: number, key: 'sprayedM2' | 'coveredM2') =>
			cells.filter((c) => c.col === col).reduce((s, c) => s + c[key], 0);
		// Column 4 is x = 40..50 m, column 5 is x = 50..60 m.
		expect(sum(4, 'sprayedM2')).toBeCloseTo(100, 6);
		expect(sum(5, 'sprayedM2')).toBeCloseTo(50, 6);
		expect(sum(4, 'coveredM2')).toBeCloseTo(250, 6);
		expect(sum(5, 'coveredM2')).toBeCloseTo(250, 6);
	});

	test('the same pass at a 30 degree heading gives the same areas (to pixel sampling)', () => {
		const log = straightLog([X0 + 50, Y0 + 10], 30, 100, (q) => q === 2 || q === 3 || q === 7);
		const { totals } = computeCoverage({ ...log, boom: smallBoom, scaleFactor: 1, grid }, region, {
			defaultRateLPerM2: 0.01
		});
		expect(Math.abs(totals.coveredM2 - 500) / 500).toBeLessThan(0.002);
		expect(Math.abs(totals.sprayedM2 - 150) / 150).toBeLessThan(0.003);
		expect(totals.volumeDrawnL).toBeCloseTo(1.5, 9);
	});

	test('with scale factor k, ground areas are projected areas / k^2', () => {
		// Projected positions 100 m apart are 100 / k m apart on the ground; the boom is 5 m on the
		// ground. k = 1.02 exaggerates UTM's scale (at most ~1.001 in a zone) so the effect is plain.
		const k = 1.02;
		const log = straightLog([X0 + 50, Y0 + 10], 30, 100, (q) => q === 2 || q === 3 || q === 7);
		const { totals } = computeCoverage({ ...log, boom: smallBoom, scaleFactor: k, grid }, region, {
			defaultRateLPerM2: 0.01
		});
		expect(Math.abs(totals.coveredM2 - 500 / k) / (500 / k)).toBeLessThan(0.002);
		expect(Math.abs(totals.sprayedM2 - 150 / k) / (150 / k)).toBeLessThan(0.003);
		expect(totals.volumeDrawnL).toBeCloseTo(1.5 / k, 9);
	});

	test('a 50% checkerboard of nozzle states gives a 50% treated share', () => {
		const log = straightLog([X0 + 50, Y0 + 10], 0, 100, (q, i) => (q + i) % 2 === 0);
		const { totals } = computeCoverage({ ...log, boom: smallBoom, scaleFactor: 1, grid }, region, {
			defaultRateLPerM2: 0.01
		});
		expect(totals.sprayedM2 / totals.coveredM2).toBeCloseTo(0.5, 6);
	});

	test('active width: a 2 m band centred on a 5 m boom is 40% of the covered area', () => {
		const log = buildLog([[[X0 + 50, Y0 + 10], [X0 + 50, Y0 + 110]]], smallBoom, [], {
			spray: 'activeWidth',
			activeWidthM: 2
		});
		const { totals, cells } = computeCoverage(
			{ ...log, boom: smallBoom, scaleFactor: 1, grid },
			region,
			{ defaultRateLPerM2: 0.01 }
		);
		expect(totals.sprayedM2).toBeCloseTo(200, 6);
		expect(totals.coveredM2).toBeCloseTo(500, 6);
		// Centred: the band x = 49..51 straddles the cell edge at x = 50 equally.
		const left = cells.filter((c) => c.col === 4).reduce((s, c) => s + c.sprayedM2, 0);
		expect(left).toBeCloseTo(100, 6);
		expect(totals.volumeL).toBeCloseTo(2, 6);
	});

	test('sprayed fraction 0.3 is spread evenly over the covered footprint', () => {
		const log = buildLog([[[X0 + 20, Y0 + 20], [X0 + 20, Y0 + 180]]], smallBoom, [], {
			spray: 'fraction',
			fraction: 0.3
		});
		const { totals, cells } = computeCoverage(
			{ ...log, boom: smallBoom, scaleFactor: 1, grid },
			region,
			{ defaultRateLPerM2: 0.01 }
		);
		expect(totals.coveredM2).toBeCloseTo(800, 6);
		expect(Math.abs(totals.sprayedM2 / totals.coveredM2 - 0.3)).toBeLessThan(0.003);
		// Evenly: every covered cell gets close to the same share.
		for (const c of cells.filter((c) => c.coveredM2 > 20)) {
			expect(Math.abs(c.sprayedM2 / c.coveredM2 - 0.3)).toBeLessThan(0.02);
		}
		expect(totals.volumeL).toBeCloseTo(0.01 * 0.3 * 800, 6);
	});

	test('flow x time: 0.05 L/s for 20 s is 1 L whatever the band area', () => {
		const log = straightLog([X0 + 50, Y0 + 10], 0, 100, (q) => q < 3);
		log.fixes.flowLPerS = new Float32Array(log.fixes.count).fill(0.05);
		const { totals, cells } = computeCoverage({ ...log, boom: smallBoom, scaleFactor: 1, grid }, region, {
			defaultRateLPerM2: 0.01
		});
		expect(totals.volumeDrawnL).toBeCloseTo(1, 5);
		expect(totals.volumeL).toBeCloseTo(1, 5);
		expect(cells.reduce((s, c) => s + c.volumeL, 0)).toBeCloseTo(1, 5);
	});

	test('logged rate wins over the default carrier rate', () => {
		const log = straightLog([X0 + 50, Y0 + 10], 0, 100, (q) => q < 2);
		log.fixes.rateLPerM2 = new Float32Array(log.fixes.count).fill(0.02);
		const { totals } = computeCoverage({ ...log, boom: smallBoom, scaleFactor: 1, grid }, region, {
			defaultRateLPerM2: 0.01
		});
		expect(totals.volumeL).toBeCloseTo(0.02 * 100, 5);
	});

	test('gaps over 3 s, jumps over 60 km/h and master-off intervals are not drawn, and counted', () => {
		const log = straightLog([X0 + 50, Y0 + 10], 0, 100, () => true);
		const t = log.fixes.timeS;
		for (let i = 50; i < t.length; i++) t[i] += 5; // one 5.2 s gap between fixes 49 and 50
		log.y[80] += 20; // 20 m in 0.2 s, twice: two intervals faster than 60 km/h
		log.fixes.master = new Uint8Array(log.fixes.count).fill(1);
		log.fixes.master.fill(0, 10, 20);
		const { totals } = computeCoverage({ ...log, boom: smallBoom, scaleFactor: 1, grid }, region, {
			defaultRateLPerM2: 0.01
		});
		expect(totals.gaps).toBe(3);
		expect(totals.masterOff).toBe(10);
		expect(totals.intervals).toBe(100 - 3 - 10);
		expect(totals.coveredM2).toBeCloseTo(5 * (100 - 3 - 10), 6);
	});

	test('bad input is refused with a reason', () => {
		const log = straightLog([X0 + 50, Y0 + 10], 0, 10, () => true);
		const input = { ...log, boom: smallBoom, scaleFactor: 1, grid };
		expect(() => computeCoverage(input, region, { defaultRateLPerM2: 0.01, pixelM: 0.127 })).toThrow(
			/must divide the cell size/
		);
		expect(() =>
			computeCoverage({ ...input, boom: { ...smallBoom, nozzleCount: 12 } }, region, { defaultRateLPerM2: 0.01 })
		).toThrow(/10 nozzle states per fix but the machine has 12/);
	});
});

// The realistic boom for the jsts checks: 0.254 m (10 in) nozzle spacing, 24 nozzles.
const boom: BoomGeometry = { boomWidthM: 6.096, nozzleCount: 24, nozzleSpacingM: 0.254 };

function compareWithJsts(name: string, region: Rings, passes: Pass[], k: number, seed: number, zone?: Rings) {
	const grid = gridFor(region);
	const rand = seededRandom(seed);
	const patches = inventPatches(
		rand,
		60,
		[grid.originX, grid.originY, grid.originX + grid.cols * 10, grid.originY + grid.rows * 10],
		[0.5, 6]
	);
	const log = buildLog(passes, boom, patches, { k });
	const input: CoverageInput = { ...log, boom, scaleFactor: k, grid };
	const rate = 0.01;
	const ours = computeCoverage(input, region, { defaultRateLPerM2: rate });
	const ref = referenceFootprints(log.x, log.y, log.fixes, boom, k, grid, { rateLPerM2: rate });
	const regionG = jstsPolygon(region, grid);
	const refCovered = areaInside(ref.covered, regionG, k);
	const refSprayed = areaInside(ref.sprayed, regionG, k);
	const tolerance = (a: number) => Math.max(0.0005 * a, 5);
	return { grid, log, input, ours, ref, regionG, refCovered, refSprayed, tolerance, rate, name, zone };
}

function p95(values: number[]): number {
	const s = [...values].sort((a, b) => a - b);
	return s[Math.min(s.length - 1, Math.floor(0.95 * s.length))];
}

// jsts needs seconds per case (its robust fallback union is slow).
describe('agreement with the exact union of the same footprints (jsts)', { timeout: 180_000 }, () => {
	test('crossing passes on a rotated field: totals within 0.05% or 5 m2, cells p95 <= 0.25 m2 (jsts exact union)', () => {
		const c = Math.cos(0.3);
		const s = Math.sin(0.3);
		const corner = (u: number, v: number) => [X0 + 60 + u * c - v * s, Y0 + 10 + u * s + v * c];
		const region = [ring([corner(0, 0), corner(90, 0), corner(90, 90), corner(0, 90)])];
		const passes: Pass[] = [];
		// 7.5 m apart with a 6.1 m boom: uncovered strips between passes.
		for (let u = 3; u < 90; u += 7.5) passes.push([corner(u, -5), corner(u, 95)]);
		for (let v = 3; v < 90; v += 11) passes.push([corner(-5, v), corner(95, v)]);
		const r = compareWithJsts('crossing', region, passes, 0.9996, 1);
		expect(Math.abs(r.ours.totals.coveredM2 - r.refCovered)).toBeLessThan(r.tolerance(r.refCovered));
		expect(Math.abs(r.ours.totals.sprayedM2 - r.refSprayed)).toBeLessThan(r.tolerance(r.refSprayed));
		expect(r.refSprayed).toBeGreaterThan(500);
		expect(r.refCovered).toBeLessThan(0.95 * r.ours.totals.areaM2);
		const refCells = perCellAreas(r.ref.sprayed, r.regionG, r.grid, 0.9996);
		const errors = r.ours.cells.map((cell) => Math.abs(cell.sprayedM2 - (refCells.get(`${cell.col},${cell.row}`) ?? 0)));
		for (const key of refCells.keys()) {
			const [col, row] = key.split(',').map(Number);
			expect(r.ours.cells.some((cell) => cell.col === col && cell.row === row)).toBe(true);
		}
		expect(p95(errors)).toBeLessThanOrEqual(0.25);
		// Volume counts overlaps: every drawn interval's bands at the rate (analytic, same footprints).
		expect(r.ours.totals.volumeDrawnL).toBeCloseTo(r.ref.volumeL, 6);
	});

	test('overlapping headland rounds on an irregular field (jsts exact union)', () => {
		const outline = [
			[X0 + 5, Y0 + 5],
			[X0 + 115, Y0 + 12],
			[X0 + 128, Y0 + 95],
			[X0 + 60, Y0 + 130],
			[X0 + 2, Y0 + 80]
		];
		const region = [ring(outline)];
		// Rounds inset 3 m and 8.5 m towards the middle (boom 6.1 m: 0.6 m overlap, and corners).
		const inset = (d: number): Pass => {
			const cx = X0 + 62;
			const cy = Y0 + 62;
			const pts = outline.map(([x, y]) => {
				const l = Math.hypot(x - cx, y - cy);
				return [x + ((cx - x) * d) / l, y + ((cy - y) * d) / l];
			});
			return [...pts, pts[0]];
		};
		const r = compareWithJsts('headland', region, [inset(3), inset(8.5)], 1, 2);
		expect(Math.abs(r.ours.totals.coveredM2 - r.refCovered)).toBeLessThan(r.tolerance(r.refCovered));
		expect(Math.abs(r.ours.totals.sprayedM2 - r.refSprayed)).toBeLessThan(r.tolerance(r.refSprayed));
		expect(r.refCovered).toBeGreaterThan(3000);
	});

	test('curved passes (jsts exact union)', () => {
		const region = [square(X0, Y0, 120, 120)];
		const passes: Pass[] = [];
		for (let rad = 10; rad < 110; rad += 5.9) passes.push(arc(X0, Y0, rad, 0.05, Math.PI / 2 - 0.05));
		const r = compareWithJsts('curved', region, passes, 1.0002, 3);
		expect(Math.abs(r.ours.totals.coveredM2 - r.refCovered)).toBeLessThan(r.tolerance(r.refCovered));
		expect(Math.abs(r.ours.totals.sprayedM2 - r.refSprayed)).toBeLessThan(r.tolerance(r.refSprayed));
		const refCells = perCellAreas(r.ref.sprayed, r.regionG, r.grid, 1.0002);
		const errors = r.ours.cells.map((cell) => Math.abs(cell.sprayedM2 - (refCells.get(`${cell.col},${cell.row}`) ?? 0)));
		expect(p95(errors)).toBeLessThanOrEqual(0.25);
	});

	test('a field with a hole, diagonal passes, and a zone (jsts exact union)', () => {
		const hole = Array.from({ length: 24 }, (_, i) => {
			const a = (2 * Math.PI * i) / 24;
			return [X0 + 55 + 18 * Math.cos(a), Y0 + 50 + 14 * Math.sin(a)];
		});
		const region = [square(X0 + 3, Y0 + 4, 100, 95), ring(hole)];
		const d = [Math.sin(0.65), Math.cos(0.65)];
		const passes: Pass[] = [];
		for (let off = -78; off < 78; off += 6) {
			const cx = X0 + 53 + off * d[1];
			const cy = Y0 + 51 - off * d[0];
			passes.push([
				[cx - 75 * d[0], cy - 75 * d[1]],
				[cx + 75 * d[0], cy + 75 * d[1]]
			]);
		}
		const r = compareWithJsts('hole', region, passes, 0.9998, 4);
		expect(Math.abs(r.ours.totals.coveredM2 - r.refCovered)).toBeLessThan(r.tolerance(r.refCovered));
		expect(Math.abs(r.ours.totals.sprayedM2 - r.refSprayed)).toBeLessThan(r.tolerance(r.refSprayed));
		// Nothing counted inside the hole: the covered area stays below the field area.
		expect(r.ours.totals.coveredM2).toBeLessThan(r.ours.totals.areaM2);
		expect(r.ours.totals.areaM2).toBeCloseTo(jstsPolygon(region, r.grid).getArea() / 0.9998 ** 2, 6);

		// A triangular zone that crosses the hole's edge.
		const zone = [
			ring([
				[X0 + 20, Y0 + 20],
				[X0 + 80, Y0 + 35],
				[X0 + 45, Y0 + 85]
			])
		];
		const z = summariseZone(r.input, zone, { defaultRateLPerM2: r.rate });
		const zoneG = jstsPolygon(zone, r.grid);
		const refZoneSprayed = areaInside(r.ref.sprayed, zoneG, 0.9998);
		const refZoneCovered = areaInside(r.ref.covered, zoneG, 0.9998);
		expect(Math.abs(z.totals.sprayedM2 - refZoneSprayed)).toBeLessThan(r.tolerance(refZoneSprayed));
		expect(Math.abs(z.totals.coveredM2 - refZoneCovered)).toBeLessThan(r.tolerance(refZoneCovered));
		expect(z.totals.areaM2).toBeCloseTo(zoneG.getArea() / 0.9998 ** 2, 6);
		// Zone cells use the field's numbering, and add up to the zone's totals.
		for (const zc of z.cells) {
			expect(zc.col).toBeGreaterThanOrEqual(0);
			expect(zc.row).toBeGreaterThanOrEqual(0);
			expect(zc.col).toBeLessThan(r.grid.cols);
			expect(zc.row).toBeLessThan(r.grid.rows);
		}
		expect(z.cells.reduce((s, c) => s + c.sprayedM2, 0)).toBeCloseTo(z.totals.sprayedM2, 6);
	});
});

describe('row strips', () => {
	test('a tiny memory budget (many strips) gives exactly the figures of one strip', () => {
		const region = [square(X0 + 1, Y0 + 2, 97, 88)];
		const grid = gridFor(region);
		const passes: Pass[] = [];
		for (let v = 3; v < 90; v += 5.5) passes.push([[X0 - 5, Y0 + v], [X0 + 105, Y0 + v + 30]]);
		const log = buildLog(passes, boom, inventPatches(seededRandom(9), 40, [X0, Y0, X0 + 100, Y0 + 90], [1, 5]));
		const input: CoverageInput = { ...log, boom, scaleFactor: 1, grid };
		const one = computeCoverage(input, region, { defaultRateLPerM2: 0.01 });
		const many = computeCoverage(input, region, { defaultRateLPerM2: 0.01, maxRasterBytes: 1 });
		expect(many.totals).toEqual(one.totals);
		expect(many.cells).toEqual(one.cells);
	});
});
