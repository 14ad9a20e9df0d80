// The exact reference the raster engine is checked against: the same footprints (DESIGN.md, "The
// computation") built as polygons and unioned with jsts, the JavaScript port of JTS. Slow and
// exact; tests only (jsts is a dev dependency).
import GeometryFactory from 'jsts/org/locationtech/jts/geom/GeometryFactory.js';
import Coordinate from 'jsts/org/locationtech/jts/geom/Coordinate.js';
import UnaryUnionOp from 'jsts/org/locationtech/jts/operation/union/UnaryUnionOp.js';
import GeometryPrecisionReducer from 'jsts/org/locationtech/jts/precision/GeometryPrecisionReducer.js';
import PrecisionModel from 'jsts/org/locationtech/jts/geom/PrecisionModel.js';
import 'jsts/org/locationtech/jts/monkey.js';
import type { BoomGeometry, FixColumns, GridSpec } from '../types';

// jsts ships loose typings (`any`); these names keep the reference readable.
type Geometry = {
	getArea(): number;
	union(o: Geometry): Geometry;
	intersection(o: Geometry): Geometry;
	difference(o: Geometry): Geometry;
	getEnvelopeInternal(): { getMinX(): number; getMinY(): number; getMaxX(): number; getMaxY(): number };
	isEmpty(): boolean;
};

const gf = new GeometryFactory();

/** Local origin: JTS's classic overlay is far more robust on small coordinates than on UTM ones. */
export type Origin = { originX: number; originY: number };

export function jstsPolygon(rings: Float64Array[], { originX, originY }: Origin): Geometry {
	const lr = (r: Float64Array) => {
		const cs: Coordinate[] = [];
		for (let i = 0; i < r.length; i += 2) cs.push(new Coordinate(r[i] - originX, r[i + 1] - originY));
		if (r[0] !== r[r.length - 2] || r[1] !== r[r.length - 1]) cs.push(new Coordinate(r[0] - originX, r[1] - originY));
		return gf.createLinearRing(cs);
	};
	// Even-odd rings as one outer ring plus holes, or several disjoint outer rings.
	const [outer, ...holes] = rings;
	return gf.createPolygon(lr(outer), holes.map(lr)) as Geometry;
}

function quad(pts: number[][]): Geometry {
	return gf.createPolygon(
		gf.createLinearRing([...pts, pts[0]].map(([x, y]) => new Coordinate(x, y)))
	) as Geometry;
}

export type ReferenceFootprints = { covered: Geometry; sprayed: Geometry; volumeL: number };

/**
 * Exact union of the covered and sprayed footprints of a nozzle log, in projected metres, plus
 * the analytic volume (rate x band area) of every drawn interval.
 */
export function referenceFootprints(
	x: Float64Array,
	y: Float64Array,
	fixes: FixColumns,
	boom: BoomGeometry,
	k: number,
	{ originX, originY }: Origin,
	{ maxGapS = 3, maxSpeedMPerS = 60 / 3.6, rateLPerM2 = 0 } = {}
): ReferenceFootprints {
	if (fixes.spray.kind !== 'nozzles') throw new Error('the jsts reference draws nozzle logs only');
	const { bits, nozzleWords } = fixes.spray;
	const half = (boom.boomWidthM * k) / 2;
	const rects: Geometry[] = [];
	const bands: Geometry[] = [];
	let volumeL = 0;
	for (let i = 0; i + 1 < fixes.count; i++) {
		const dt = fixes.timeS[i + 1] - fixes.timeS[i];
		const ex = x[i + 1] - x[i];
		const ey = y[i + 1] - y[i];
		const len = Math.hypot(ex, ey);
		if (!(dt > 0) || dt > maxGapS || len / k > maxSpeedMPerS * dt || len === 0) continue;
		const dx = ex / len;
		const dy = ey / len;
		const at = (s: number, t: number) => [x[i] - originX + s * dx + t * dy, y[i] - originY + s * dy - t * dx];
		const rect = (t0: number, t1: number) => quad([at(0, t0), at(len, t0), at(len, t1), at(0, t1)]);
		rects.push(rect(-half, half));
		// One band per run of adjacent open nozzles (DESIGN.md); nozzle by nozzle, JTS's overlay
		// meets too many shared edges.
		const isOpen = (q: number) => q < boom.nozzleCount && (bits[i * nozzleWords + (q >> 5)] >>> (q & 31)) & 1;
		for (let q = 0; q < boom.nozzleCount; q++) {
			if (!isOpen(q)) continue;
			let end = q + 1;
			while (isOpen(end)) end++;
			const t0 = (q * boom.nozzleSpacingM - boom.boomWidthM / 2) * k;
			const t1 = (end * boom.nozzleSpacingM - boom.boomWidthM / 2) * k;
			bands.push(rect(t0, t1));
			volumeL += (rateLPerM2 * (end - q) * boom.nozzleSpacingM * len) / k;
			q = end;
		}
	}
	return { covered: union(rects), sprayed: union(bands), volumeL };
}

// JTS's classic overlay (jsts has no OverlayNG) can throw on nearly collinear shared edges.
// The fallbacks are JTS's own: snap to a 1 micrometre precision model (area change ~1e-6 m2
// per metre of edge), then a zero-width buffer, its documented robust union of polygons.
const micrometre = new PrecisionModel(1e6);
const reduce = (g: Geometry): Geometry => GeometryPrecisionReducer.reduce(g, micrometre) as Geometry;
const buffer0 = (g: Geometry): Geometry => (g as Geometry & { buffer(d: number): Geometry }).buffer(0);

function robust(op: (a: Geometry, b: Geometry) => Geometry, a: Geometry, b: Geometry): Geometry {
	try {
		return op(a, b);
	} catch {
		try {
			return op(reduce(a), reduce(b));
		} catch {
			return op(buffer0(reduce(a)), buffer0(reduce(b)));
		}
	}
}

function union(gs: Geometry[]): Geometry {
	if (!gs.length) return gf.createPolygon() as Geometry;
	const collection = gf.createGeometryCollection(gs) as unknown as Geometry;
	try {
		return UnaryUnionOp.union(collection) as Geometry;
	} catch {
		try {
			return UnaryUnionOp.union(reduce(collection)) as Geometry;
		} catch {
			return buffer0(collection);
		}
	}
}

const intersect = (a: Geometry, b: Geometry) => robust((p, q) => p.intersection(q), a, b);

/** Area of `g` inside `region`, ellipsoidal m2 (projected / k^2). */
export function areaInside(g: Geometry, region: Geometry, k: number): number {
	return intersect(g, region).getArea() / (k * k);
}

/** Per-cell area of `g` inside `region` for every cell of the grid, keyed "col,row" (local origin = grid origin). */
export function perCellAreas(g: Geometry, region: Geometry, grid: GridSpec, k: number): Map<string, number> {
	const inRegion = intersect(g, region);
	const out = new Map<string, number>();
	const s = grid.cellSizeM;
	for (let row = 0; row < grid.rows; row++) {
		const y0 = row * s;
		// Clip by the row first so each cell intersection sees only a strip of the union.
		const strip = intersect(
			inRegion,
			quad([
				[0, y0],
				[grid.cols * s, y0],
				[grid.cols * s, y0 + s],
				[0, y0 + s]
			])
		);
		if (strip.isEmpty()) continue;
		for (let col = 0; col < grid.cols; col++) {
			const x0 = col * s;
			const a = intersect(
				strip,
				quad([
					[x0, y0],
					[x0 + s, y0],
					[x0 + s, y0 + s],
					[x0, y0 + s]
				])
			).getArea();
			if (a > 0) out.set(`${col},${row}`, a / (k * k));
		}
	}
	return out;
}
