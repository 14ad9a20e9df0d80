// Engine benchmark core: an invented, deterministic 1,000,000-fix as-applied log (a ~250 ha field
// near 47.1 N, 118.3 W that does not exist; 144 nozzles at 0.254 m on a 36.576 m boom; 5 Hz;
// 16-22 km/h; headland rounds, back-and-forth passes and weed patches), and a timed run of
// clean + split + coverage on it. The full bench (parse, Postgres writes) builds on these exports.
//   npx tsx scripts/bench.ts [fixes]        runs the engine on an in-memory log and prints figures
import { openSync, writeSync, closeSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import type { Polygon } from 'geojson';
import type { BoomGeometry, CleaningReport, FixColumns } from '../src/lib/compute/types';
import { cleanFixes } from '../src/lib/compute/clean-fixes';
import { splitByField } from '../src/lib/compute/split-by-field';
import { computeCoverage, type CoverageTotals } from '../src/lib/compute/coverage';
import { seededRandom } from '../src/lib/compute/seeded-random';
import {
	fieldScaleFactor,
	gridSpecFor,
	projectLngLat,
	projectRings,
	utmZoneFor
} from '../src/lib/geo/projection';

export const BENCH_BOOM: BoomGeometry = { boomWidthM: 36.576, nozzleCount: 144, nozzleSpacingM: 0.254 };
const LNG0 = -118.3;
const LAT0 = 47.1;
const M_PER_DEG_LAT = 111_195;
const M_PER_DEG_LNG = M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180);
const DT_S = 0.2;

/** The invented field's outline in local metres (east, north), convex, counter-clockwise. */
const OUTLINE_M: [number, number][] = [
	[-800, -760],
	[840, -730],
	[830, 700],
	[60, 790],
	[-820, 740]
];

const toLngLat = ([e, n]: [number, number]): [number, number] => [LNG0 + e / M_PER_DEG_LNG, LAT0 + n / M_PER_DEG_LAT];

/** The bench field boundary (invented), GeoJSON [lng, lat]. */
export const BENCH_FIELD: Polygon = {
	type: 'Polygon',
	coordinates: [[...OUTLINE_M, OUTLINE_M[0]].map(toLngLat)]
};


/** Convex polygon moved inwards by d metres (each edge offset, neighbours intersected). */
function inset(poly: [number, number][], d: number): [number, number][] {
	const n = poly.length;
	const lines = poly.map(([ax, ay], i) => {
		const [bx, by] = poly[(i + 1) % n];
		const l = Math.hypot(bx - ax, by - ay);
		const nx = -(by - ay) / l;
		const ny = (bx - ax) / l;
		return { px: ax + nx * d, py: ay + ny * d, dx: (bx - ax) / l, dy: (by - ay) / l };
	});
	return lines.map((a, i) => {
		const b = lines[(i + n - 1) % n];
		const den = a.dx * b.dy - a.dy * b.dx;
		const t = ((b.px - a.px) * b.dy - (b.py - a.py) * b.dx) / den;
		return [a.px + t * a.dx, a.py + t * a.dy];
	});
}

/** Where the line c + t d crosses a convex counter-clockwise polygon: [t0, t1] or null. */
function clipLine(poly: [number, number][], cx: number, cy: number, dx: number, dy: number): [number, number] | null {
	let t0 = -Infinity;
	let t1 = Infinity;
	for (let i = 0; i < poly.length; i++) {
		const [ax, ay] = poly[i];
		const [bx, by] = poly[(i + 1) % poly.length];
		const nx = -(by - ay);
		const ny = bx - ax;
		const num = (cx - ax) * nx + (cy - ay) * ny;
		const den = dx * nx + dy * ny;
		if (den === 0) {
			if (num < 0) return null;
		} else if (den > 0) t0 = Math.max(t0, -num / den);
		else t1 = Math.min(t1, -num / den);
	}
	return t0 < t1 ? [t0, t1] : null;
}

/** One application's path in local metres: road in, two headland rounds, passes with U-turns. */
function applicationPath(angleDeg: number): [number, number][] {
	const w = BENCH_BOOM.boomWidthM;
	const pts: [number, number][] = [];
	const r1 = inset(OUTLINE_M, w / 2);
	const r2 = inset(OUTLINE_M, 1.5 * w);
	pts.push([r1[0][0] - 150, r1[0][1] - 100]);
	for (const round of [r1, r2]) for (const p of [...round, round[0]]) pts.push(p);
	const inner = inset(OUTLINE_M, 2 * w);
	const a = (angleDeg * Math.PI) / 180;
	const dx = Math.sin(a);
	const dy = Math.cos(a);
	const ax = Math.cos(a);
	const ay = -Math.sin(a);
	const across = inner.map(([x, y]) => x * ax + y * ay);
	const lo = Math.min(...across);
	const hi = Math.max(...across);
	let forward = true;
	let prevEnd: [number, number] | null = null;
	for (let o = lo + w / 2; o < hi; o += w) {
		const span = clipLine(inner, o * ax, o * ay, dx, dy);
		if (!span) continue;
		const [t0, t1] = span;
		const start: [number, number] = forward
			? [o * ax + t0 * dx, o * ay + t0 * dy]
			: [o * ax + t1 * dx, o * ay + t1 * dy];
		const end: [number, number] = forward
			? [o * ax + t1 * dx, o * ay + t1 * dy]
			: [o * ax + t0 * dx, o * ay + t0 * dy];
		if (prevEnd) {
			// U-turn: carry on to the farther of the two pass ends, then a semicircle of radius w / 2.
			const sd = forward ? -1 : 1; // direction of travel of the pass just finished
			const tPrev = (prevEnd[0] * dx + prevEnd[1] * dy) * sd;
			const tNext = (start[0] * dx + start[1] * dy) * sd;
			let p = prevEnd;
			if (tNext > tPrev) {
				p = [prevEnd[0] + (tNext - tPrev) * sd * dx, prevEnd[1] + (tNext - tPrev) * sd * dy];
				pts.push(p);
			}
			const cx = p[0] + (w / 2) * ax;
			const cy = p[1] + (w / 2) * ay;
			for (let k = 1; k < 24; k++) {
				const phi = (Math.PI * k) / 24;
				const along = Math.sin(phi) * (w / 2);
				const side = -Math.cos(phi) * (w / 2);
				pts.push([cx + side * ax + along * sd * dx, cy + side * ay + along * sd * dy]);
			}
		}
		pts.push(start, end);
		prevEnd = end;
		forward = !forward;
	}
	if (prevEnd) pts.push([prevEnd[0], prevEnd[1] + 200]);
	return pts;
}

/** A 0.5 m weed map over the field: patches (ellipses) plus scattered single weeds. */
function weedMap(rand: () => number) {
	const cellM = 0.5;
	const minE = -900;
	const minN = -850;
	const cols = 3600;
	const rows = 3400;
	const map = new Uint8Array(cols * rows);
	for (let p = 0; p < 650; p++) {
		const ce = minE + 100 + rand() * (cols * cellM - 200);
		const cn = minN + 100 + rand() * (rows * cellM - 200);
		const ra = 2 + rand() ** 2 * 28;
		const rb = ra * (0.4 + rand() * 0.6);
		const rot = rand() * Math.PI;
		const c = Math.cos(rot);
		const s = Math.sin(rot);
		for (let r = Math.floor((cn - ra - minN) / cellM); r <= (cn + ra - minN) / cellM; r++) {
			for (let q = Math.floor((ce - ra - minE) / cellM); q <= (ce + ra - minE) / cellM; q++) {
				const e = minE + (q + 0.5) * cellM - ce;
				const n = minN + (r + 0.5) * cellM - cn;
				const u = (e * c + n * s) / ra;
				const v = (-e * s + n * c) / rb;
				// Patchy inside: density falls off towards the edge.
				if (u * u + v * v < 1 && rand() < 0.9 - 0.5 * (u * u + v * v)) map[r * cols + q] = 1;
			}
		}
	}
	for (let i = 0; i < 60_000; i++) map[Math.floor(rand() * map.length)] = 1;
	return (e: number, n: number) => {
		const q = Math.floor((e - minE) / cellM);
		const r = Math.floor((n - minN) / cellM);
		return q >= 0 && r >= 0 && q < cols && r < rows ? map[r * cols + q] : 0;
	};
}

export type BenchLog = FixColumns & { speedMPerS: Float32Array; rateLPerM2: Float32Array };

/**
 * The invented log as in-memory columns (what a parser would produce). Deterministic for a seed.
 * A few rows are deliberately bad so cleaning has work: duplicates, GNSS spikes, swapped rows.
 */
export function generateBenchFixes({ count = 1_000_000, seed = 20240501 } = {}): BenchLog {
	const rand = seededRandom(seed);
	const weeds = weedMap(rand);
	const nw = 5;
	const timeS = new Float64Array(count);
	const lng = new Float64Array(count);
	const lat = new Float64Array(count);
	const bits = new Uint32Array(count * nw);
	const speed = new Float32Array(count);
	const rate = new Float32Array(count);
	const angles = [0, 90, 35];
	let i = 0;
	// Whole ticks of 0.2 s from each application's start, so times print exactly.
	let appStartS = Date.UTC(2024, 4, 1, 7, 0, 0) / 1000;
	let tick = 0;
	let v = 5;
	let target = 5;
	const half = BENCH_BOOM.boomWidthM / 2;
	for (let app = 0; i < count; app++) {
		const path = applicationPath(angles[app % angles.length]);
		let seg = 0;
		let along = 0;
		while (i < count && seg + 1 < path.length) {
			const [ax, ay] = path[seg];
			const [bx, by] = path[seg + 1];
			const len = Math.hypot(bx - ax, by - ay);
			if (along > len) {
				along -= len;
				seg++;
				continue;
			}
			const dx = (bx - ax) / len;
			const dy = (by - ay) / len;
			const e = ax + dx * along + (rand() - 0.5) * 0.04;
			const n = ay + dy * along + (rand() - 0.5) * 0.04;
			[lng[i], lat[i]] = toLngLat([e, n]);
			timeS[i] = appStartS + tick * DT_S;
			speed[i] = v;
			rate[i] = 0.01 * (0.97 + 0.06 * rand()); // about 100 L/ha
			for (let q = 0; q < 144; q++) {
				const off = (q + 0.5) * BENCH_BOOM.nozzleSpacingM - half;
				if (weeds(e + off * dy, n - off * dx)) bits[i * nw + (q >> 5)] |= 1 << (q & 31);
			}
			i++;
			if (rand() < 0.002) target = (16 + 6 * rand()) / 3.6;
			v += (target - v) * 0.02;
			along += v * DT_S;
			tick++;
		}
		appStartS += 2 * 86400; // the next application, two days later
		tick = 0;
	}
	// Deliberate faults, at fixed rows.
	for (let j = 97_001; j < count; j += 97_001) {
		lng[j] = lng[j - 1];
		lat[j] = lat[j - 1];
		timeS[j] = timeS[j - 1];
		bits.copyWithin(j * nw, (j - 1) * nw, j * nw);
	}
	for (let j = 150_001; j + 1 < count; j += 150_001) lat[j] += 5000 / M_PER_DEG_LAT;
	for (let j = 200_003; j < count; j += 200_003) {
		[timeS[j], timeS[j - 1]] = [timeS[j - 1], timeS[j]];
		[lng[j], lng[j - 1]] = [lng[j - 1], lng[j]];
		[lat[j], lat[j - 1]] = [lat[j - 1], lat[j]];
	}
	return {
		count,
		timeS,
		lng,
		lat,
		spray: { kind: 'nozzles', nozzleCount: 144, nozzleWords: nw, bits },
		speedMPerS: speed,
		rateLPerM2: rate,
		sourceRow: Uint32Array.from({ length: count }, (_, j) => j + 2)
	};
}

/**
 * Writes the invented log as CSV: time (ISO 8601), lat, lon, speed_kmh, rate_lha, nozzles (one
 * 144-character '0'/'1' string, left to right). Returns the number of data rows.
 */
export async function writeBenchCsv(path: string, options: { count?: number; seed?: number } = {}): Promise<number> {
	const log = generateBenchFixes(options);
	const fd = openSync(path, 'w');
	try {
		writeSync(fd, 'time,lat,lon,speed_kmh,rate_lha,nozzles\n');
		const chars = new Array<string>(144);
		let chunk: string[] = [];
		const { spray } = log;
		if (spray.kind !== 'nozzles') throw new Error('unreachable');
		for (let i = 0; i < log.count; i++) {
			for (let q = 0; q < 144; q++) chars[q] = (spray.bits[i * 5 + (q >> 5)] >>> (q & 31)) & 1 ? '1' : '0';
			chunk.push(
				`${new Date(Math.round(log.timeS[i] * 1000)).toISOString()},${log.lat[i].toFixed(8)},${log.lng[i].toFixed(8)},${(log.speedMPerS[i] * 3.6).toFixed(2)},${(log.rateLPerM2[i] * 1e4).toFixed(1)},${chars.join('')}\n`
			);
			if (chunk.length === 10_000) {
				writeSync(fd, chunk.join(''));
				chunk = [];
			}
		}
		if (chunk.length) writeSync(fd, chunk.join(''));
	} finally {
		closeSync(fd);
	}
	return log.count;
}

/** Interval start fixes plus the fix after each, once each, ascending. */
function withNextFix(starts: Uint32Array, count: number): Uint32Array {
	const mark = new Uint8Array(count);
	for (let j = 0; j < starts.length; j++) {
		mark[starts[j]] = 1;
		if (starts[j] + 1 < count) mark[starts[j] + 1] = 1;
	}
	let n = 0;
	for (let i = 0; i < count; i++) n += mark[i];
	const out = new Uint32Array(n);
	for (let i = 0, j = 0; i < count; i++) if (mark[i]) out[j++] = i;
	return out;
}

export type EngineTimings = {
	fixes: number;
	cleanMs: number;
	splitMs: number;
	projectMs: number;
	coverageMs: number;
	totalMs: number;
	fixesPerS: number;
	/** CPU time of this process over the run: on a busy shared machine, wall time overstates. */
	cpuMs: number;
	fixesPerCpuS: number;
	maxRssMB: number;
};

/**
 * Clean + split + coverage (per field: project, grid, raster) on in-memory fixes; returns
 * timings and each field's totals. Pixel 0.1 m, 10 m cells, carrier 100 L/ha unless told.
 */
export function runEngine(
	fixes: FixColumns,
	fields: Polygon[] = [BENCH_FIELD],
	boom: BoomGeometry = BENCH_BOOM,
	{ pixelM = 0.1, cellSizeM = 10, defaultRateLPerM2 = 0.01 } = {}
): {
	timings: EngineTimings;
	fields: { totals: CoverageTotals; cells: number; fixesInField: number }[];
	outside: number;
	report: CleaningReport;
} {
	const cpu0 = process.cpuUsage();
	const t0 = performance.now();
	const { fixes: clean, report } = cleanFixes(fixes);
	const t1 = performance.now();
	const split = splitByField(clean.lng, clean.lat, clean.count, fields);
	const t2 = performance.now();
	let projectMs = 0;
	let coverageMs = 0;
	const results = fields.map((field, f) => {
		const p0 = performance.now();
		const zone = utmZoneFor(field);
		const grid = gridSpecFor(field, { cellSizeM, zone });
		const k = fieldScaleFactor(field, zone);
		const starts = split.fixesByField[f];
		// Interval ends may lie outside the field: project starts and their next fixes.
		const { x, y } = projectLngLat(zone.proj, clean.lng, clean.lat, withNextFix(starts, clean.count));
		const region = projectRings(zone.proj, field);
		const p1 = performance.now();
		const r = computeCoverage({ x, y, fixes: clean, starts, boom, scaleFactor: k, grid }, region, {
			pixelM,
			defaultRateLPerM2
		});
		coverageMs += performance.now() - p1;
		projectMs += p1 - p0;
		return { totals: r.totals, cells: r.cells.length, fixesInField: starts.length };
	});
	const totalMs = performance.now() - t0;
	const cpu = process.cpuUsage(cpu0);
	const cpuMs = (cpu.user + cpu.system) / 1000;
	report.gaps = results.reduce((s, r) => s + r.totals.gaps, 0);
	return {
		timings: {
			fixes: fixes.count,
			cleanMs: t1 - t0,
			splitMs: t2 - t1,
			projectMs,
			coverageMs,
			totalMs,
			fixesPerS: fixes.count / (totalMs / 1000),
			cpuMs,
			fixesPerCpuS: fixes.count / (cpuMs / 1000),
			maxRssMB: process.resourceUsage().maxRSS / 1024
		},
		fields: results,
		outside: split.outside,
		report
	};
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
	const count = Number(process.argv[2] ?? 1_000_000);
	const g0 = performance.now();
	const log = generateBenchFixes({ count });
	console.log(`generated ${count} fixes in ${((performance.now() - g0) / 1000).toFixed(1)} s`);
	const out = runEngine(log);
	console.log(JSON.stringify(out, null, 2));
}
