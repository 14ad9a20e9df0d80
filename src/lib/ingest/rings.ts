// Ring hygiene for imported boundaries: close rings, drop repeated points and hairline spikes,
// and find rings that cross themselves or each other. Coordinates are [lng, lat] degrees.
import type { Position } from 'geojson';

export type Crossing = { ring: number; vertex: number; otherRing: number; otherVertex: number };

/** Twice the signed area in degree units, with x scaled by cos(latitude) so angles are true
 * locally. Positive = counter-clockwise. */
export function signedArea2(ring: Position[]): number {
	let s = 0;
	for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) s += (ring[j][0] - ring[i][0]) * (ring[j][1] + ring[i][1]);
	return s;
}

function same(a: Position, b: Position): boolean {
	return a[0] === b[0] && a[1] === b[1];
}

export type RingCleanup = { ring: Position[]; wasOpen: boolean; repeats: number; spikes: number[] };

/** Closes the ring, removes repeated consecutive points and spikes where the outline doubles
 * back on itself (turn sharper than 0.06 degrees and less than 0.1% of the ring's area).
 * `spikes` lists the removed vertices by their index in the input. */
export function cleanRing(input: Position[]): RingCleanup {
	let wasOpen = false;
	let repeats = 0;
	const pts: { p: Position; index: number }[] = [];
	input.forEach((p, index) => {
		if (pts.length && same(pts[pts.length - 1].p, p)) repeats++;
		else pts.push({ p: [p[0], p[1]], index });
	});
	if (pts.length > 1 && same(pts[0].p, pts[pts.length - 1].p)) pts.pop();
	else if (pts.length > 0) wasOpen = true;
	const spikes: number[] = [];
	const k = Math.cos(((pts.reduce((s, q) => s + q.p[1], 0) / Math.max(pts.length, 1)) * Math.PI) / 180);
	const ringArea = () => Math.abs(signedArea2(pts.map((q) => [q.p[0] * k, q.p[1]]))) / 2;
	let changed = true;
	while (changed && pts.length > 3) {
		changed = false;
		const total = ringArea();
		for (let i = 0; i < pts.length && pts.length > 3; i++) {
			const a = pts[(i + pts.length - 1) % pts.length].p;
			const b = pts[i].p;
			const c = pts[(i + 1) % pts.length].p;
			const ux = (a[0] - b[0]) * k, uy = a[1] - b[1];
			const vx = (c[0] - b[0]) * k, vy = c[1] - b[1];
			const angle = Math.abs(Math.atan2(ux * vy - uy * vx, ux * vx + uy * vy));
			const triangle = Math.abs(ux * vy - uy * vx) / 2;
			if (angle < 1e-3 && triangle <= 1e-3 * total) {
				spikes.push(pts[i].index);
				pts.splice(i, 1);
				changed = true;
				break;
			}
			if (same(a, c)) {
				spikes.push(pts[i].index);
				pts.splice(i, 1);
				changed = true;
				break;
			}
		}
		// A removed spike can leave a repeated point behind.
		for (let i = pts.length - 1; i > 0; i--) if (same(pts[i].p, pts[i - 1].p)) pts.splice(i, 1);
	}
	const ring = pts.map((q) => q.p);
	if (ring.length) ring.push([ring[0][0], ring[0][1]]);
	return { ring, wasOpen, repeats, spikes };
}

function orient(a: Position, b: Position, c: Position): number {
	const v = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
	// Relative tolerance: coordinates near 100 degrees carry about 1e-14 of rounding.
	const scale = Math.abs(b[0] - a[0]) + Math.abs(b[1] - a[1]) + Math.abs(c[0] - a[0]) + Math.abs(c[1] - a[1]);
	return Math.abs(v) <= 1e-12 * scale * scale ? 0 : Math.sign(v);
}

function onSegment(a: Position, b: Position, p: Position): boolean {
	return Math.min(a[0], b[0]) <= p[0] && p[0] <= Math.max(a[0], b[0]) && Math.min(a[1], b[1]) <= p[1] && p[1] <= Math.max(a[1], b[1]);
}

/** 2 = the segments cross in their interiors; 1 = they touch or overlap; 0 = apart. */
function segmentsMeet(a: Position, b: Position, c: Position, d: Position): 0 | 1 | 2 {
	const o1 = orient(a, b, c), o2 = orient(a, b, d), o3 = orient(c, d, a), o4 = orient(c, d, b);
	if (o1 * o2 < 0 && o3 * o4 < 0) return 2;
	if ((o1 === 0 && onSegment(a, b, c)) || (o2 === 0 && onSegment(a, b, d)) || (o3 === 0 && onSegment(c, d, a)) || (o4 === 0 && onSegment(c, d, b)))
		return 1;
	return 0;
}

/** Where closed rings cross themselves (any contact of non-neighbouring edges) or each other
 * (crossing interiors; rings may touch at a point). Sweep over edges sorted by west edge. */
export function findCrossings(rings: Position[][], limit = 10): Crossing[] {
	type Seg = { r: number; i: number; n: number; a: Position; b: Position; minX: number; maxX: number; minY: number; maxY: number };
	const segs: Seg[] = [];
	rings.forEach((ring, r) => {
		const n = ring.length - 1;
		for (let i = 0; i < n; i++) {
			const a = ring[i], b = ring[i + 1];
			segs.push({ r, i, n, a, b, minX: Math.min(a[0], b[0]), maxX: Math.max(a[0], b[0]), minY: Math.min(a[1], b[1]), maxY: Math.max(a[1], b[1]) });
		}
	});
	segs.sort((s, t) => s.minX - t.minX);
	const out: Crossing[] = [];
	for (let x = 0; x < segs.length && out.length < limit; x++) {
		const s = segs[x];
		for (let y = x + 1; y < segs.length && segs[y].minX <= s.maxX; y++) {
			const t = segs[y];
			if (t.minY > s.maxY || t.maxY < s.minY) continue;
			if (s.r === t.r) {
				const gap = Math.abs(s.i - t.i);
				if (gap <= 1 || gap === s.n - 1) continue; // neighbours share a vertex
				if (segmentsMeet(s.a, s.b, t.a, t.b)) out.push(order(s, t));
			} else if (segmentsMeet(s.a, s.b, t.a, t.b) === 2) out.push(order(s, t));
			if (out.length >= limit) break;
		}
	}
	return out.sort((p, q) => p.ring - q.ring || p.vertex - q.vertex);
}

function order(s: { r: number; i: number }, t: { r: number; i: number }): Crossing {
	const [p, q] = s.r < t.r || (s.r === t.r && s.i < t.i) ? [s, t] : [t, s];
	return { ring: p.r, vertex: p.i, otherRing: q.r, otherVertex: q.i };
}

/** Even-odd point in ring (closed ring). */
export function pointInRing(p: Position, ring: Position[]): boolean {
	let inside = false;
	for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
		const a = ring[i], b = ring[j];
		if (a[1] > p[1] !== b[1] > p[1] && p[0] < ((b[0] - a[0]) * (p[1] - a[1])) / (b[1] - a[1]) + a[0]) inside = !inside;
	}
	return inside;
}
