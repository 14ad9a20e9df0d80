// Cleaning an as-applied log before coverage: invalid positions out, time order restored,
// exact duplicates out, isolated GNSS spikes out. Every fix removed is counted (CleaningReport);
// gaps between the fixes that stay are counted later, by the coverage step, which skips them.
import type { CleaningReport, FixColumns, SprayState } from './types';

export type CleanOptions = {
	/** A fix faster than this from both neighbours, while they agree with each other, is a spike. */
	maxSpeedMPerS?: number;
};

const EARTH_RADIUS_M = 6_371_008.8;
const DEG = Math.PI / 180;

/** Ground distance for nearby points (equirectangular; fine for the metres between fixes). */
export function distanceM(lngA: number, latA: number, lngB: number, latB: number): number {
	const x = (lngB - lngA) * DEG * Math.cos(((latA + latB) / 2) * DEG);
	const y = (latB - latA) * DEG;
	return Math.hypot(x, y) * EARTH_RADIUS_M;
}

/**
 * Cleans a log: drops fixes with invalid time or position (non-finite, out of range, or exactly
 * 0, 0: a receiver with no fix), sorts by time (stable, counting fixes that came earlier than a
 * previous one), drops duplicates (same time and position as the fix before) and isolated jumps.
 * @example const { fixes, report } = cleanFixes(parsed);
 */
export function cleanFixes(
	input: FixColumns,
	{ maxSpeedMPerS = 60 / 3.6 }: CleanOptions = {}
): { fixes: FixColumns; report: CleaningReport } {
	const n = input.count;
	const { timeS, lng, lat } = input;
	let order = new Uint32Array(n);
	let m = 0;
	let invalidPositions = 0;
	for (let i = 0; i < n; i++) {
		const x = lng[i];
		const y = lat[i];
		const valid =
			Number.isFinite(timeS[i]) &&
			Number.isFinite(x) &&
			Number.isFinite(y) &&
			Math.abs(y) <= 90 &&
			Math.abs(x) <= 180 &&
			!(x === 0 && y === 0);
		if (valid) order[m++] = i;
		else invalidPositions++;
	}

	let outOfOrder = 0;
	let latest = -Infinity;
	for (let j = 0; j < m; j++) {
		const t = timeS[order[j]];
		if (t < latest) outOfOrder++;
		else latest = t;
	}
	if (outOfOrder > 0) {
		// Stable: equal times keep file order, so duplicates stay next to each other.
		const sorted = Array.from(order.subarray(0, m)).sort((a, b) => timeS[a] - timeS[b] || a - b);
		order = Uint32Array.from(sorted);
	}

	let duplicates = 0;
	let kept = 0;
	for (let j = 0; j < m; j++) {
		const i = order[j];
		if (kept > 0) {
			const p = order[kept - 1];
			if (timeS[p] === timeS[i] && lng[p] === lng[i] && lat[p] === lat[i]) {
				duplicates++;
				continue;
			}
		}
		order[kept++] = i;
	}

	// A spike: too fast from the previous kept fix and to the next, while those two agree.
	let jumps = 0;
	let out = 0;
	const speed = (a: number, b: number) => {
		const dt = Math.abs(timeS[b] - timeS[a]);
		const d = distanceM(lng[a], lat[a], lng[b], lat[b]);
		return dt > 0 ? d / dt : d > 0 ? Infinity : 0;
	};
	for (let j = 0; j < kept; j++) {
		const i = order[j];
		if (out > 0 && j + 1 < kept) {
			const prev = order[out - 1];
			const next = order[j + 1];
			if (
				speed(prev, i) > maxSpeedMPerS &&
				speed(i, next) > maxSpeedMPerS &&
				speed(prev, next) <= maxSpeedMPerS
			) {
				jumps++;
				continue;
			}
		}
		order[out++] = i;
	}

	const fixes = selectFixes(input, order.subarray(0, out));
	return {
		fixes,
		report: {
			input: n,
			used: out,
			duplicates,
			outOfOrder,
			jumps,
			gaps: 0,
			invalidPositions
		}
	};
}

/** The fixes at `index`, in that order, as new columns. */
export function selectFixes(input: FixColumns, index: Uint32Array): FixColumns {
	const n = index.length;
	const pick64 = (a: Float64Array) => {
		const out = new Float64Array(n);
		for (let j = 0; j < n; j++) out[j] = a[index[j]];
		return out;
	};
	const pick32 = (a: Float32Array) => {
		const out = new Float32Array(n);
		for (let j = 0; j < n; j++) out[j] = a[index[j]];
		return out;
	};
	let spray: SprayState;
	const s = input.spray;
	if (s.kind === 'nozzles') {
		const w = s.nozzleWords;
		const bits = new Uint32Array(n * w);
		for (let j = 0; j < n; j++) {
			const from = index[j] * w;
			for (let q = 0; q < w; q++) bits[j * w + q] = s.bits[from + q];
		}
		spray = { kind: 'nozzles', nozzleCount: s.nozzleCount, nozzleWords: w, bits };
	} else if (s.kind === 'activeWidth') spray = { kind: 'activeWidth', widthM: pick32(s.widthM) };
	else spray = { kind: 'fraction', fraction: pick32(s.fraction) };
	const out: FixColumns = {
		count: n,
		timeS: pick64(input.timeS),
		lng: pick64(input.lng),
		lat: pick64(input.lat),
		spray,
		sourceRow: Uint32Array.from(index, (i) => input.sourceRow[i])
	};
	if (input.master) {
		const a = input.master;
		out.master = Uint8Array.from(index, (i) => a[i]);
	}
	if (input.rateLPerM2) out.rateLPerM2 = pick32(input.rateLPerM2);
	if (input.flowLPerS) out.flowLPerS = pick32(input.flowLPerS);
	if (input.speedMPerS) out.speedMPerS = pick32(input.speedMPerS);
	if (input.pressurePa) out.pressurePa = pick32(input.pressurePa);
	if (input.boomHeightM) out.boomHeightM = pick32(input.boomHeightM);
	return out;
}
