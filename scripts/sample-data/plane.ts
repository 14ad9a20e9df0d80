// Plane geometry in local metres for laying out fields and planning the sprayer's path.
import type { Xy } from './frame';

/** Signed area (m2), positive for counter-clockwise rings. Rings are open (no repeated end). */
export function signedAreaM2(ring: Xy[]): number {
	let s = 0;
	for (let i = 0; i < ring.length; i++) {
		const [x0, y0] = ring[i];
		const [x1, y1] = ring[(i + 1) % ring.length];
		s += x0 * y1 - x1 * y0;
	}
	return s / 2;
}

export function ccw(ring: Xy[]): Xy[] {
	return signedAreaM2(ring) < 0 ? [...ring].reverse() : ring;
}

export function cw(ring: Xy[]): Xy[] {
	return signedAreaM2(ring) > 0 ? [...ring].reverse() : ring;
}

/**
 * A counter-clockwise ring moved inwards by d metres: each edge offset along its inward normal,
 * neighbours intersected (a mitre). Nearly straight corners fall back to the averaged normal.
 * Fine for the gentle curves of the demo fields; not a general polygon offset.
 */
export function insetRing(ring: Xy[], d: number): Xy[] {
	const n = ring.length;
	const lines = ring.map(([ax, ay], i) => {
		const [bx, by] = ring[(i + 1) % n];
		const l = Math.hypot(bx - ax, by - ay);
		const nx = -(by - ay) / l;
		const ny = (bx - ax) / l;
		return { px: ax + nx * d, py: ay + ny * d, dx: (bx - ax) / l, dy: (by - ay) / l, nx, ny };
	});
	return lines.map((a, i) => {
		const b = lines[(i + n - 1) % n];
		const den = a.dx * b.dy - a.dy * b.dx;
		if (Math.abs(den) < 1e-6) return [ring[i][0] + a.nx * d, ring[i][1] + a.ny * d];
		const t = ((b.px - a.px) * b.dy - (b.py - a.py) * b.dx) / den;
		return [a.px + t * a.dx, a.py + t * a.dy];
	});
}

/** Parameters t where the line c + t d crosses the ring's edges, unsorted. */
export function lineCrossings(ring: Xy[], cx: number, cy: number, dx: number, dy: number, out: number[]): void {
	for (let i = 0; i < ring.length; i++) {
		const [ax, ay] = ring[i];
		const [bx, by] = ring[(i + 1) % ring.length];
		const ex = bx - ax;
		const ey = by - ay;
		const den = dx * ey - dy * ex;
		if (Math.abs(den) < 1e-12) continue;
		// Solve c + t d = a + u e.
		const wx = ax - cx;
		const wy = ay - cy;
		const t = (wx * ey - wy * ex) / den;
		const u = (wx * dy - wy * dx) / den;
		// Half-open in u so a line through a vertex counts it once.
		if (u >= 0 && u < 1) out.push(t);
	}
}

/** Inside spans [t0, t1] of the line across rings (even-odd, so holes are outside). */
export function insideSpans(rings: Xy[][], cx: number, cy: number, dx: number, dy: number): [number, number][] {
	const ts: number[] = [];
	for (const r of rings) lineCrossings(r, cx, cy, dx, dy, ts);
	ts.sort((a, b) => a - b);
	const spans: [number, number][] = [];
	for (let i = 0; i + 1 < ts.length; i += 2) if (ts[i + 1] - ts[i] > 1e-6) spans.push([ts[i], ts[i + 1]]);
	return spans;
}

/** Even-odd point in rings. */
export function insideRings(rings: Xy[][], x: number, y: number): boolean {
	let inside = false;
	for (const ring of rings) {
		for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
			const [xi, yi] = ring[i];
			const [xj, yj] = ring[j];
			if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside;
		}
	}
	return inside;
}

/** Points along a smooth curve x = f(y) or similar, sampled every step metres, ends included. */
export function sample(from: number, to: number, step: number, at: (s: number) => Xy): Xy[] {
	const n = Math.max(1, Math.round(Math.abs(to - from) / step));
	return Array.from({ length: n + 1 }, (_, k) => at(from + ((to - from) * k) / n));
}

/** An ellipse-like closed ring with a gentle wobble, counter-clockwise. */
export function blob(cx: number, cy: number, a: number, b: number, wobble: number, vertices = 48, phase = 0): Xy[] {
	return Array.from({ length: vertices }, (_, k) => {
		const t = (2 * Math.PI * k) / vertices;
		const r = 1 + wobble * Math.sin(3 * t + phase) + (wobble / 2) * Math.cos(5 * t + 2 * phase);
		return [cx + a * r * Math.cos(t), cy + b * r * Math.sin(t)] as Xy;
	});
}
