// Invented logs for tests: paths in projected metres, fixes every `stepM` at 5 Hz, nozzles opened
// by invented circular weed patches. Nothing here comes from a real field or machine.
import type { BoomGeometry, FixColumns, SprayState } from '../types';
import { seededRandom } from '../seeded-random';


export type Patch = { x: number; y: number; radiusM: number };

export function inventPatches(
	rand: () => number,
	count: number,
	[minX, minY, maxX, maxY]: [number, number, number, number],
	[rMin, rMax]: [number, number]
): Patch[] {
	return Array.from({ length: count }, () => ({
		x: minX + rand() * (maxX - minX),
		y: minY + rand() * (maxY - minY),
		radiusM: rMin + rand() * (rMax - rMin)
	}));
}

/** A pass: a polyline driven at one speed; passes are separated by a 10 s pause (a gap). */
export type Pass = number[][];

export type SyntheticLog = {
	x: Float64Array;
	y: Float64Array;
	fixes: FixColumns;
};

/**
 * Samples each pass every `stepM` metres (0.2 s apart) and sets nozzle k open when the point
 * under it lies in a patch. `spray` chooses the log's kind of spray state.
 */
export function buildLog(
	passes: Pass[],
	boom: BoomGeometry,
	patches: Patch[],
	{
		stepM = 1,
		dtS = 0.2,
		k = 1,
		spray = 'nozzles',
		fraction = 0.3,
		activeWidthM = 2
	}: {
		stepM?: number;
		dtS?: number;
		k?: number;
		spray?: SprayState['kind'];
		fraction?: number;
		activeWidthM?: number;
	} = {}
): SyntheticLog {
	const xs: number[] = [];
	const ys: number[] = [];
	const ts: number[] = [];
	let t = 1_700_000_000;
	for (const pass of passes) {
		for (let s = 0; s + 1 < pass.length; s++) {
			const [ax, ay] = pass[s];
			const [bx, by] = pass[s + 1];
			const len = Math.hypot(bx - ax, by - ay);
			const steps = Math.max(1, Math.round(len / stepM));
			for (let j = s === 0 ? 0 : 1; j <= steps; j++) {
				xs.push(ax + ((bx - ax) * j) / steps);
				ys.push(ay + ((by - ay) * j) / steps);
				ts.push(t);
				t += dtS;
			}
		}
		t += 10;
	}
	const n = xs.length;
	const nozzleWords = (boom.nozzleCount + 31) >> 5;
	const bits = new Uint32Array(n * nozzleWords);
	for (let i = 0; i < n; i++) {
		const j = i + 1 < n ? i + 1 : i - 1;
		const sgn = i + 1 < n ? 1 : -1;
		const ex = (xs[j] - xs[i]) * sgn;
		const ey = (ys[j] - ys[i]) * sgn;
		const len = Math.hypot(ex, ey) || 1;
		const rx = ey / len;
		const ry = -ex / len;
		for (let q = 0; q < boom.nozzleCount; q++) {
			const off = ((q + 0.5) * boom.nozzleSpacingM - boom.boomWidthM / 2) * k;
			const px = xs[i] + off * rx;
			const py = ys[i] + off * ry;
			if (patches.some((p) => Math.hypot(px - p.x, py - p.y) < p.radiusM * k)) {
				bits[i * nozzleWords + (q >> 5)] |= 1 << (q & 31);
			}
		}
	}
	const sprayState: SprayState =
		spray === 'nozzles'
			? { kind: 'nozzles', nozzleCount: boom.nozzleCount, nozzleWords, bits }
			: spray === 'fraction'
				? { kind: 'fraction', fraction: new Float32Array(n).fill(fraction) }
				: { kind: 'activeWidth', widthM: new Float32Array(n).fill(activeWidthM) };
	return {
		x: Float64Array.from(xs),
		y: Float64Array.from(ys),
		fixes: {
			count: n,
			timeS: Float64Array.from(ts),
			lng: new Float64Array(n),
			lat: new Float64Array(n),
			spray: sprayState,
			sourceRow: Uint32Array.from({ length: n }, (_, i) => i + 2)
		}
	};
}

/** A circular arc from angle a0 to a1 (radians) around (cx, cy). */
export function arc(cx: number, cy: number, radiusM: number, a0: number, a1: number, stepM = 1): Pass {
	const steps = Math.max(2, Math.ceil((Math.abs(a1 - a0) * radiusM) / stepM));
	return Array.from({ length: steps + 1 }, (_, i) => {
		const a = a0 + ((a1 - a0) * i) / steps;
		return [cx + radiusM * Math.cos(a), cy + radiusM * Math.sin(a)];
	});
}

/** Flat ring array from [x, y] pairs. */
export function ring(points: number[][]): Float64Array {
	return Float64Array.from(points.flat());
}

export { seededRandom };
