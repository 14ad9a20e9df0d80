// Hotspot cells of a field's grid as polygons in the grid's projection: every cell grown by the
// buffer on all four sides, the squares unioned exactly, the union's outline traced. Exact and
// dependency-free because every edge is axis-parallel: the union is computed on the grid of the
// squares' own edge coordinates, so no polygon library and no tolerance is involved.
//
// The buffer is square (a mitred buffer, JTS's JOIN_MITRE): for an axis-parallel outline that is
// the Minkowski sum with a square, which keeps zones rectilinear like the cells they came from.
// A round buffer would add at most (4 - π) b² less per outer corner (21 m² at b = 5 m), an
// amount no sprayer section can resolve.
import type { GridSpec } from '../compute/types';

/** A ring as [x, y] positions in projected metres, closed (first = last). */
export type XYRing = [number, number][];
/** An outer ring (counter-clockwise) and its holes (clockwise), as in RFC 7946. */
export type XYPolygon = XYRing[];

export type CellRef = { col: number; row: number };

export type CellPolygon = {
	/** Outer ring then holes, projected metres. */
	rings: XYPolygon;
	/** The input cells whose centre lies inside this polygon. */
	cells: CellRef[];
};

/**
 * The union of the cells grown by `bufferM`, one polygon per connected part (parts that touch at
 * a single corner stay separate polygons), largest first.
 * @example cellsToPolygons([{ col: 0, row: 0 }, { col: 1, row: 0 }], grid, 0) // one 20 m x 10 m rectangle
 */
export function cellsToPolygons(cells: CellRef[], grid: Pick<GridSpec, 'originX' | 'originY' | 'cellSizeM'>, bufferM: number): CellPolygon[] {
	if (!(bufferM >= 0) || !Number.isFinite(bufferM)) throw new Error(`cellsToPolygons: buffer must be zero or more metres, got ${bufferM}`);
	if (!(grid.cellSizeM > 0)) throw new Error('cellsToPolygons: the grid needs a positive cell size');
	if (cells.length === 0) return [];
	const c = grid.cellSizeM;
	// Edges in grid units relative to the origin, so coordinates stay small and exact for whole cells.
	const b = bufferM / c;
	const rects = cells.map(({ col, row }) => [col - b, row - b, col + 1 + b, row + 1 + b] as const);
	const polygons = rectangleUnion(rects);
	const toXY = ([u, v]: [number, number]): [number, number] => [grid.originX + u * c, grid.originY + v * c];
	const out: CellPolygon[] = polygons.map((rings) => ({ rings: rings.map((ring) => ring.map(toXY)), cells: [] }));
	// Each cell's centre lies inside exactly one polygon (its own grown square is in the union).
	const boxes = polygons.map((rings) => ringBox(rings[0]));
	for (const cell of cells) {
		const u = cell.col + 0.5;
		const v = cell.row + 0.5;
		const i = polygons.findIndex((rings, k) => inBox(boxes[k], u, v) && insidePolygon(rings, u, v));
		if (i >= 0) out[i].cells.push(cell);
	}
	return out
		.map((p, i) => ({ p, area: polygonArea(polygons[i]) }))
		.sort((x, y) => y.area - x.area)
		.map(({ p }) => p);
}

type Rect = readonly [number, number, number, number];

/**
 * Exact union of axis-parallel rectangles [x0, y0, x1, y1] as polygons (outer ring
 * counter-clockwise, holes clockwise, rings closed, no collinear vertices).
 */
export function rectangleUnion(rects: readonly Rect[]): XYPolygon[] {
	const valid = rects.filter(([x0, y0, x1, y1]) => x1 > x0 && y1 > y0);
	if (valid.length === 0) return [];
	const xs = [...new Set(valid.flatMap((r) => [r[0], r[2]]))].sort((a, b) => a - b);
	const ys = [...new Set(valid.flatMap((r) => [r[1], r[3]]))].sort((a, b) => a - b);
	const xi = new Map(xs.map((x, i) => [x, i]));
	const yi = new Map(ys.map((y, i) => [y, i]));
	const W = xs.length - 1;
	const H = ys.length - 1;
	// 2-D difference array over the compressed grid: +1 at a rectangle's corner, -1 beyond it.
	const diff = new Int32Array((W + 1) * (H + 1));
	for (const [x0, y0, x1, y1] of valid) {
		const a = xi.get(x0)!, b = yi.get(y0)!, c = xi.get(x1)!, d = yi.get(y1)!;
		diff[b * (W + 1) + a]++;
		diff[b * (W + 1) + c]--;
		diff[d * (W + 1) + a]--;
		diff[d * (W + 1) + c]++;
	}
	const filled = new Uint8Array(W * H);
	const acc = new Int32Array((W + 1) * (H + 1));
	for (let j = 0; j <= H; j++) {
		for (let i = 0; i <= W; i++) {
			const k = j * (W + 1) + i;
			acc[k] = diff[k] + (i > 0 ? acc[k - 1] : 0) + (j > 0 ? acc[k - (W + 1)] : 0) - (i > 0 && j > 0 ? acc[k - (W + 1) - 1] : 0);
			if (i < W && j < H && acc[k] > 0) filled[j * W + i] = 1;
		}
	}
	const at = (i: number, j: number) => (i >= 0 && j >= 0 && i < W && j < H ? filled[j * W + i] : 0);

	// Directed boundary edges with the filled side on the left, keyed by their start vertex.
	// Vertex (i, j) is the corner at xs[i], ys[j]; directions 0 east, 1 north, 2 west, 3 south.
	const key = (i: number, j: number) => j * (W + 1) + i;
	const outgoing = new Map<number, number[]>(); // vertex -> directions leaving it
	const add = (i: number, j: number, dir: number) => {
		const k = key(i, j);
		const list = outgoing.get(k);
		if (list) list.push(dir);
		else outgoing.set(k, [dir]);
	};
	for (let j = 0; j <= H; j++) {
		for (let i = 0; i < W; i++) {
			// Horizontal edge from (i, j) to (i + 1, j): cell above is (i, j), below is (i, j - 1).
			const above = at(i, j);
			const below = at(i, j - 1);
			if (above && !below) add(i, j, 0); // east, filled on the left (north)
			if (below && !above) add(i + 1, j, 2); // west, filled on the left (south)
		}
	}
	for (let i = 0; i <= W; i++) {
		for (let j = 0; j < H; j++) {
			const right = at(i, j);
			const left = at(i - 1, j);
			if (left && !right) add(i, j, 1); // north, filled on the left (west)
			if (right && !left) add(i, j + 1, 3); // south, filled on the left (east)
		}
	}
	const step = [
		[1, 0],
		[0, 1],
		[-1, 0],
		[0, -1]
	];
	const rings: [number, number][][] = [];
	for (const [start, dirs] of outgoing) {
		while (dirs.length) {
			// Follow the edges until the walk comes back to where it began; every edge is used once.
			const ring: [number, number][] = [];
			let k = start;
			let dir = dirs.pop()!;
			for (;;) {
				const i = k % (W + 1);
				const j = (k - i) / (W + 1);
				ring.push([i, j]);
				k = key(i + step[dir][0], j + step[dir][1]);
				if (k === start) break;
				const next = outgoing.get(k)!;
				// Where two filled cells meet only at this corner there are two ways on: turn left,
				// which keeps hugging the same cell, so parts that only touch stay apart.
				const pick = [(dir + 1) % 4, dir, (dir + 3) % 4].find((d) => next.includes(d));
				if (pick === undefined) throw new Error('rectangleUnion: the outline does not close');
				next.splice(next.indexOf(pick), 1);
				dir = pick;
			}
			rings.push(ring);
		}
	}
	// A ring that passes a vertex twice (a part that touches itself at a corner) becomes simple
	// loops there: an outer ring and a hole that touches it, as OGC allows.
	const simple = rings.flatMap(splitAtRepeats).map((ring) => dropCollinear(ring.map(([i, j]) => [xs[i], ys[j]] as [number, number])));
	const outers: { ring: [number, number][]; holes: [number, number][][]; area: number }[] = [];
	const holes: [number, number][][] = [];
	for (const ring of simple) {
		const a = signedArea(ring);
		if (a > 0) outers.push({ ring, holes: [], area: a });
		else if (a < 0) holes.push(ring);
	}
	outers.sort((p, q) => p.area - q.area);
	for (const hole of holes) {
		// A point just inside the hole's first edge (to its right, the empty side) finds the smallest outer around it.
		const [x0, y0] = hole[0];
		const [x1, y1] = hole[1];
		const len = Math.hypot(x1 - x0, y1 - y0);
		const e = 1e-7 * len;
		const px = (x0 + x1) / 2 + ((y1 - y0) / len) * e;
		const py = (y0 + y1) / 2 - ((x1 - x0) / len) * e;
		const owner = outers.find((o) => pointInRing(o.ring, px, py));
		if (!owner) throw new Error('rectangleUnion: a hole lies in no outline');
		owner.holes.push(hole);
	}
	const close = (r: [number, number][]) => [...r, r[0]] as XYRing;
	return outers.map((o) => [close(o.ring), ...o.holes.map(close)]);
}

/** Splits a closed vertex loop (last vertex not repeated) wherever it passes a vertex twice. */
function splitAtRepeats(ring: [number, number][]): [number, number][][] {
	const out: [number, number][][] = [];
	const stack: [number, number][] = [];
	const seen = new Map<string, number>();
	for (const p of ring) {
		const k = `${p[0]},${p[1]}`;
		const at = seen.get(k);
		if (at !== undefined) {
			const loop = stack.splice(at);
			for (const q of loop) seen.delete(`${q[0]},${q[1]}`);
			out.push(loop);
		}
		seen.set(k, stack.length);
		stack.push(p);
	}
	if (stack.length) out.push(stack);
	return out.filter((r) => r.length >= 4);
}

function dropCollinear(ring: [number, number][]): [number, number][] {
	const n = ring.length;
	return ring.filter((p, i) => {
		const a = ring[(i + n - 1) % n];
		const b = ring[(i + 1) % n];
		return (p[0] - a[0]) * (b[1] - p[1]) - (p[1] - a[1]) * (b[0] - p[0]) !== 0;
	});
}

function signedArea(ring: [number, number][]): number {
	let a = 0;
	for (let i = 0; i < ring.length; i++) {
		const [x0, y0] = ring[i];
		const [x1, y1] = ring[(i + 1) % ring.length];
		a += x0 * y1 - x1 * y0;
	}
	return a / 2;
}

function polygonArea(rings: XYPolygon): number {
	return rings.reduce((s, r, i) => s + (i === 0 ? 1 : -1) * Math.abs(signedArea(r.slice(0, -1) as [number, number][])), 0);
}

function pointInRing(ring: [number, number][], px: number, py: number): boolean {
	let inside = false;
	for (let i = 0, k = ring.length - 1; i < ring.length; k = i++) {
		const [xi, yi] = ring[i];
		const [xk, yk] = ring[k];
		if (yi > py !== yk > py && px < ((xk - xi) * (py - yi)) / (yk - yi) + xi) inside = !inside;
	}
	return inside;
}

function insidePolygon(rings: XYPolygon, px: number, py: number): boolean {
	if (!pointInRing(rings[0] as [number, number][], px, py)) return false;
	return !rings.slice(1).some((h) => pointInRing(h as [number, number][], px, py));
}

function ringBox(ring: XYRing): [number, number, number, number] {
	let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
	for (const [x, y] of ring) {
		x0 = Math.min(x0, x); x1 = Math.max(x1, x);
		y0 = Math.min(y0, y); y1 = Math.max(y1, y);
	}
	return [x0, y0, x1, y1];
}

function inBox([x0, y0, x1, y1]: [number, number, number, number], x: number, y: number) {
	return x >= x0 && x <= x1 && y >= y0 && y <= y1;
}
