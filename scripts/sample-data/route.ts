// The sprayer's planned path over a field: two headland rounds, then back-and-forth passes in
// the tillage direction with U-turns in the headland (spray off), and road transits between.
import type { Xy } from './frame';
import type { DemoField } from './layout';
import { insetRing, insideSpans } from './plane';
import { between } from './random';

/** A polyline with, per segment (k to k+1), whether the master switch is on and the speed the
 * operator aims for, and per vertex the highest speed to pass it at (corners, turns). */
export class Path {
	xs: number[] = [];
	ys: number[] = [];
	master: number[] = [];
	cruise: number[] = [];
	cap: number[] = [];

	get last(): Xy {
		return [this.xs[this.xs.length - 1], this.ys[this.ys.length - 1]];
	}

	start(p: Xy): void {
		this.xs.push(p[0]);
		this.ys.push(p[1]);
		this.cap.push(0.5);
	}

	/** Drive to p with the master switch as given, aiming for cruise m/s; pass p at most at cap m/s. */
	to(p: Xy, master: boolean, cruiseMPerS: number, capMPerS = Infinity): void {
		const [lx, ly] = this.last;
		if (Math.hypot(p[0] - lx, p[1] - ly) < 0.05) {
			this.cap[this.cap.length - 1] = Math.min(this.cap[this.cap.length - 1], capMPerS);
			return;
		}
		this.master.push(master ? 1 : 0);
		this.cruise.push(cruiseMPerS);
		// Slow to the new segment's speed before entering it.
		this.cap[this.cap.length - 1] = Math.min(this.cap[this.cap.length - 1], cruiseMPerS);
		this.xs.push(p[0]);
		this.ys.push(p[1]);
		this.cap.push(capMPerS);
	}
}

const KMH = 1 / 3.6;
const TURN_MPS = 9 * KMH;
const CORNER_MPS = 10 * KMH;
const ROAD_MPS = 25 * KMH;

function nearestIndex(ring: Xy[], p: Xy): number {
	let best = 0;
	let bestD = Infinity;
	ring.forEach(([x, y], i) => {
		const d = Math.hypot(x - p[0], y - p[1]);
		if (d < bestD) [best, bestD] = [i, d];
	});
	return best;
}

/** Turning angle at vertex i of a closed ring, radians. */
function turnAt(ring: Xy[], i: number): number {
	const n = ring.length;
	const [ax, ay] = ring[(i + n - 1) % n];
	const [bx, by] = ring[i];
	const [cx, cy] = ring[(i + 1) % n];
	const a1 = Math.atan2(by - ay, bx - ax);
	const a2 = Math.atan2(cy - by, cx - bx);
	let d = Math.abs(a2 - a1);
	if (d > Math.PI) d = 2 * Math.PI - d;
	return d;
}

function headlandRound(path: Path, ring: Xy[], cruise: number): void {
	const i0 = nearestIndex(ring, path.last);
	const n = ring.length;
	path.to(ring[i0], false, CORNER_MPS, CORNER_MPS);
	for (let k = 1; k <= n; k++) {
		const i = (i0 + k) % n;
		path.to(ring[i], true, cruise, turnAt(ring, i) > 0.6 ? CORNER_MPS : Infinity);
	}
}

type PassLine = { o: number; spans: [number, number][] };

export type FieldRouteOptions = { headlands?: boolean; rand: () => number; boomWidthM: number };

/** Appends one part of a field (outer ring plus holes) to the path. */
function routePart(path: Path, part: Xy[][], angleDeg: number, opts: FieldRouteOptions): void {
	const w = opts.boomWidthM;
	const { rand } = opts;
	const [outer, ...holes] = part;
	if (opts.headlands !== false) {
		const headCruise = between(rand, 14, 17) * KMH;
		headlandRound(path, insetRing(outer, w / 2), headCruise);
		headlandRound(path, insetRing(outer, 1.5 * w), headCruise);
	}
	const inner = insetRing(outer, 2 * w);
	const a = (angleDeg * Math.PI) / 180;
	const dx = Math.sin(a);
	const dy = Math.cos(a);
	const ax = Math.cos(a);
	const ay = -Math.sin(a);
	const across = inner.map(([x, y]) => x * ax + y * ay);
	const lo = Math.min(...across);
	const hi = Math.max(...across);
	const lines: PassLine[] = [];
	// The last pass overlaps its neighbour rather than leave a strip unsprayed by the headland.
	const nPasses = Math.max(1, Math.ceil((hi - lo) / w));
	for (let k = 0; k < nPasses; k++) {
		const o = Math.min(lo + w / 2 + k * w, hi - w / 2);
		const spans = insideSpans([inner, ...holes], o * ax, o * ay, dx, dy);
		if (spans.length) lines.push({ o, spans });
	}
	if (!lines.length) return;
	// Start with the pass end nearest to where the sprayer is.
	const here = path.last;
	const endPoint = (l: PassLine, atStart: boolean): Xy => {
		const t = atStart ? l.spans[0][0] : l.spans[l.spans.length - 1][1];
		return [l.o * ax + t * dx, l.o * ay + t * dy];
	};
	const options = [
		{ order: lines, forward: true },
		{ order: lines, forward: false },
		{ order: [...lines].reverse(), forward: true },
		{ order: [...lines].reverse(), forward: false }
	];
	const dist = (p: Xy) => Math.hypot(p[0] - here[0], p[1] - here[1]);
	const best = options.reduce((b, c) => (dist(endPoint(c.order[0], c.forward)) < dist(endPoint(b.order[0], b.forward)) ? c : b));
	let forward = best.forward;
	let prev: { end: Xy; o: number; sd: number } | null = null;
	for (const line of best.order) {
		const sd = forward ? 1 : -1;
		const spans = forward ? line.spans : [...line.spans].reverse().map(([t0, t1]) => [t1, t0] as [number, number]);
		const at = (t: number): Xy => [line.o * ax + t * dx, line.o * ay + t * dy];
		const start = at(spans[0][0]);
		if (prev) {
			// U-turn: carry on to the farther of the two pass ends, then a half circle across to the
			// next pass (spray off; the headland rounds cover the turning ground).
			const psd = prev.sd;
			const tPrev = (prev.end[0] * dx + prev.end[1] * dy) * psd;
			const tNext = (start[0] * dx + start[1] * dy) * psd;
			let p = prev.end;
			if (tNext > tPrev) {
				p = [p[0] + (tNext - tPrev) * psd * dx, p[1] + (tNext - tPrev) * psd * dy];
				path.to(p, false, TURN_MPS, TURN_MPS);
			}
			const r = (line.o - prev.o) / 2;
			const cx = p[0] + r * ax;
			const cy = p[1] + r * ay;
			for (let k = 1; k < 16; k++) {
				const phi = (Math.PI * k) / 16;
				const along = Math.sin(phi) * Math.abs(r);
				const side = -Math.cos(phi) * r;
				path.to([cx + side * ax + along * psd * dx, cy + side * ay + along * psd * dy], false, TURN_MPS, TURN_MPS);
			}
			path.to(start, false, TURN_MPS, TURN_MPS);
		} else path.to(start, false, CORNER_MPS, CORNER_MPS);
		const cruise = between(rand, 16, 22) * KMH;
		spans.forEach(([t0, t1], k) => {
			// Across a hole (the wetland, the farmyard) the master switch is off.
			if (k > 0) path.to(at(t0), false, cruise);
			path.to(at(t1), true, cruise, k === spans.length - 1 ? TURN_MPS : Infinity);
		});
		prev = { end: at(spans[spans.length - 1][1]), o: line.o, sd };
		forward = !forward;
	}
}

/** A road transit to p, spray off. */
export function transit(path: Path, p: Xy): void {
	path.to(p, false, ROAD_MPS, CORNER_MPS);
}

/** Entry point: just outside the outline's corner nearest to `near`, in the road allowance
 * (6 m out along both edges' outward normals; fields are 12 m or more apart). */
export function gateOf(field: DemoField, near: Xy): Xy {
	let best: Xy = near;
	let bestD = Infinity;
	for (const part of field.parts) {
		const ring = part[0];
		const n = ring.length;
		ring.forEach((q, i) => {
			const d = Math.hypot(q[0] - near[0], q[1] - near[1]);
			if (d >= bestD) return;
			// Outward normals of a counter-clockwise ring point right of each edge.
			const out = (a: Xy, b: Xy): Xy => {
				const l = Math.hypot(b[0] - a[0], b[1] - a[1]);
				return [(b[1] - a[1]) / l, -(b[0] - a[0]) / l];
			};
			const n1 = out(ring[(i + n - 1) % n], q);
			const n2 = out(q, ring[(i + 1) % n]);
			// Along a straight stretch (a sampled curve) one normal is enough.
			const same = n1[0] * n2[0] + n1[1] * n2[1] > 0.95;
			best = same ? [q[0] + 6 * n1[0], q[1] + 6 * n1[1]] : [q[0] + 6 * (n1[0] + n2[0]), q[1] + 6 * (n1[1] + n2[1])];
			bestD = d;
		});
	}
	return best;
}

/** The whole field, part after part, from wherever the path is. */
export function routeField(path: Path, field: DemoField, opts: FieldRouteOptions): void {
	const parts = [...field.parts];
	while (parts.length) {
		// The nearest part next.
		const here = path.last;
		let k = 0;
		let bestD = Infinity;
		parts.forEach((part, i) => {
			const d = Math.min(...part[0].map((q) => Math.hypot(q[0] - here[0], q[1] - here[1])));
			if (d < bestD) [k, bestD] = [i, d];
		});
		const [part] = parts.splice(k, 1);
		if (bestD > 80) transit(path, gateOf({ ...field, parts: [part] }, here));
		routePart(path, part, field.passAngleDeg, opts);
	}
}
