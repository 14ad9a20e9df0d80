// Hotspot cells to polygons, checked against jsts (the JavaScript port of JTS) as the exact
// reference: the union of the cells buffered with mitred joins (BufferParameters.JOIN_MITRE),
// compared by area, by the area of the symmetric difference, by part and hole counts, and by
// JTS's own validity test.
import { describe, expect, it } from 'vitest';
import GeometryFactory from 'jsts/org/locationtech/jts/geom/GeometryFactory.js';
import Coordinate from 'jsts/org/locationtech/jts/geom/Coordinate.js';
import UnaryUnionOp from 'jsts/org/locationtech/jts/operation/union/UnaryUnionOp.js';
import BufferOp from 'jsts/org/locationtech/jts/operation/buffer/BufferOp.js';
import BufferParameters from 'jsts/org/locationtech/jts/operation/buffer/BufferParameters.js';
import 'jsts/org/locationtech/jts/monkey.js';
import { seededRandom } from '$lib/compute/seeded-random';
import { cellsToPolygons, rectangleUnion, type CellRef, type XYPolygon } from './zone-cells';

// jsts ships loose typings; the few methods used here.
type JGeometry = {
	getArea(): number;
	getNumGeometries(): number;
	getGeometryN(n: number): JGeometry;
	getNumInteriorRing(): number;
	symDifference(o: JGeometry): JGeometry;
	isValid(): boolean;
};
const gf = new GeometryFactory();
const grid = { originX: 500_000, originY: 5_200_000, cellSizeM: 10 };

function jstsOf(polygons: XYPolygon[]): JGeometry {
	// Local coordinates (grid origin at 0, 0): JTS overlay is most robust on small numbers.
	const ring = (r: [number, number][]) => gf.createLinearRing(r.map(([x, y]) => new Coordinate(x - grid.originX, y - grid.originY)));
	const polys = polygons.map(([outer, ...holes]) => gf.createPolygon(ring(outer), holes.map(ring)));
	return gf.createMultiPolygon(polys) as unknown as JGeometry;
}

/** JTS's answer: cells as squares, unioned, buffered with mitred corners. */
function reference(cells: CellRef[], bufferM: number): JGeometry {
	const c = grid.cellSizeM;
	const squares = cells.map(({ col, row }) => {
		const x0 = col * c, y0 = row * c;
		return gf.createPolygon(gf.createLinearRing([[x0, y0], [x0 + c, y0], [x0 + c, y0 + c], [x0, y0 + c], [x0, y0]].map(([x, y]) => new Coordinate(x, y))));
	});
	const union = UnaryUnionOp.union(gf.createGeometryCollection(squares)) as JGeometry;
	if (bufferM === 0) return union;
	const params = new BufferParameters();
	params.setJoinStyle(BufferParameters.JOIN_MITRE);
	params.setMitreLimit(10);
	return BufferOp.bufferOp(union, bufferM, params) as JGeometry;
}

function holes(g: JGeometry) {
	let n = 0;
	for (let i = 0; i < g.getNumGeometries(); i++) n += g.getGeometryN(i).getNumInteriorRing();
	return n;
}

function compare(cells: CellRef[], bufferM: number) {
	const ours = cellsToPolygons(cells, grid, bufferM);
	const mine = jstsOf(ours.map((p) => p.rings));
	const ref = reference(cells, bufferM);
	expect(mine.isValid()).toBe(true);
	expect(mine.getArea()).toBeCloseTo(ref.getArea(), 6);
	expect(mine.symDifference(ref).getArea()).toBeLessThan(1e-6);
	expect(mine.getNumGeometries()).toBe(ref.getNumGeometries());
	expect(holes(mine)).toBe(holes(ref));
	// Every cell lands in exactly one polygon.
	expect(ours.reduce((n, p) => n + p.cells.length, 0)).toBe(cells.length);
	return ours;
}

const area = (rings: XYPolygon) =>
	rings.reduce((s, r, i) => {
		let a = 0;
		for (let k = 0; k + 1 < r.length; k++) a += r[k][0] * r[k + 1][1] - r[k + 1][0] * r[k][1];
		return s + a / 2; // holes run clockwise: their signed area is negative
	}, 0);

describe('cellsToPolygons', () => {
	it('one cell is its square; with a 5 m buffer a 20 m square (hand check)', () => {
		const [p] = cellsToPolygons([{ col: 3, row: 4 }], grid, 0);
		expect(p.rings).toEqual([[[500_030, 5_200_040], [500_040, 5_200_040], [500_040, 5_200_050], [500_030, 5_200_050], [500_030, 5_200_040]]]);
		const [b] = cellsToPolygons([{ col: 3, row: 4 }], grid, 5);
		expect(area(b.rings)).toBeCloseTo(400, 9);
	});

	it('outer rings run counter-clockwise and holes clockwise (RFC 7946)', () => {
		// A 3 x 3 block with the middle cell missing: 8 cells around a hole.
		const cells = [0, 1, 2].flatMap((col) => [0, 1, 2].map((row) => ({ col, row }))).filter((c) => !(c.col === 1 && c.row === 1));
		const [p] = compare(cells, 0);
		expect(p.rings).toHaveLength(2);
		expect(area([p.rings[0]])).toBeCloseTo(900, 9);
		expect(area([p.rings[1]])).toBeCloseTo(-100, 9);
		// A 2 m buffer closes nothing: the hole shrinks to 6 x 6 m.
		const [q] = compare(cells, 2);
		expect(area(q.rings)).toBeCloseTo(34 * 34 - 36, 9);
	});

	it('cells that touch only at a corner stay apart, also when the buffer makes their squares meet at a corner', () => {
		expect(compare([{ col: 0, row: 0 }, { col: 1, row: 1 }], 0)).toHaveLength(2);
		// Cell size 10 m and buffer 5 m: cells two apart diagonally grow into squares meeting at one point.
		expect(compare([{ col: 0, row: 0 }, { col: 2, row: 2 }], 5)).toHaveLength(2);
		// Two apart in a row: the grown squares share an edge and become one rectangle.
		const [joined] = compare([{ col: 0, row: 0 }, { col: 2, row: 0 }], 5);
		expect(area(joined.rings)).toBeCloseTo(40 * 20, 9);
	});

	it('a ring of cells closed only at a corner gives a hole that touches its outline (valid in JTS)', () => {
		// A U of cells whose open end is closed by a diagonal step.
		const cells = [
			{ col: 0, row: 0 }, { col: 1, row: 0 }, { col: 2, row: 0 },
			{ col: 0, row: 1 }, { col: 2, row: 1 },
			{ col: 0, row: 2 }, { col: 3, row: 2 },
			{ col: 0, row: 3 }, { col: 1, row: 3 }, { col: 2, row: 3 }
		];
		compare(cells, 0);
		// A ring of eight cells less its north-east corner: the empty middle meets the outside at
		// one point, so the outline has a hole touching it there.
		const [p] = compare([[0, 0], [1, 0], [2, 0], [0, 1], [2, 1], [0, 2], [1, 2]].map(([col, row]) => ({ col, row })), 0);
		expect(p.rings).toHaveLength(2);
	});

	it('matches JTS on invented hotspot maps, buffers 0 to 12 m', () => {
		const rand = seededRandom(20260);
		for (let trial = 0; trial < 6; trial++) {
			const size = 10 + Math.floor(rand() * 12);
			const share = 0.15 + rand() * 0.4;
			const cells: CellRef[] = [];
			for (let col = 0; col < size; col++) for (let row = 0; row < size; row++) if (rand() < share) cells.push({ col, row });
			compare(cells, [0, 2.5, 5, 12][trial % 4]);
		}
	});

	it('refuses a negative buffer', () => {
		expect(() => cellsToPolygons([{ col: 0, row: 0 }], grid, -1)).toThrow(/buffer/);
	});
});

describe('rectangleUnion', () => {
	it('unions overlapping rectangles with arbitrary edges exactly', () => {
		const polys = rectangleUnion([
			[0, 0, 3.5, 2],
			[2, 1, 5, 4.25],
			[10, 10, 11, 11]
		]);
		expect(polys).toHaveLength(2);
		expect(polys.map(area).sort((a, b) => a - b)).toEqual([1, 3.5 * 2 + 3 * 3.25 - 1.5 * 1]);
	});
});
