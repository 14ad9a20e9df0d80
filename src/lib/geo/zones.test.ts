// Zone shapes cut to the field and clear of other zones. Expected areas: GeographicLib's geodesic
// area of the rectangle that must remain (hand-made), and for hotspot zones jsts (JTS) as the exact
// reference of the buffered union cut by the field, in the grid's UTM projection.
import { describe, expect, it } from 'vitest';
import GeometryFactory from 'jsts/org/locationtech/jts/geom/GeometryFactory.js';
import Coordinate from 'jsts/org/locationtech/jts/geom/Coordinate.js';
import UnaryUnionOp from 'jsts/org/locationtech/jts/operation/union/UnaryUnionOp.js';
import BufferOp from 'jsts/org/locationtech/jts/operation/buffer/BufferOp.js';
import BufferParameters from 'jsts/org/locationtech/jts/operation/buffer/BufferParameters.js';
import 'jsts/org/locationtech/jts/monkey.js';
import type { Polygon } from 'geojson';
import { areaM2 } from './area';
import { describeField } from './field-geometry';
import { fieldScaleFactor, projectRings } from './projection';
import { checkBoundary } from './fields-boundary';
import { clipNote, clipZone, hotspotZones, intersection, type ZoneGeometry } from './zones';

const rect = (w: number, s: number, e: number, n: number): Polygon => ({ type: 'Polygon', coordinates: [[[w, s], [e, s], [e, n], [w, n], [w, s]]] });
// A field of about 1.5 x 1 km near the demo's latitude.
const field = rect(-118.32, 47.12, -118.3, 47.129);
const rel = (a: number, b: number) => Math.abs(a / b - 1);
const proj = describeField(field).grid.proj;

describe('clipZone', () => {
	it('keeps a shape inside the field as it is', () => {
		const shape = rect(-118.31, 47.122, -118.305, 47.125);
		const c = clipZone(shape, field, [], proj);
		expect(c.ok).toBe(true);
		if (!c.ok) return;
		expect(rel(c.areaM2, areaM2(shape))).toBeLessThan(1e-9);
		expect(c.outsideM2).toBeLessThan(0.01);
		expect(c.overlaps).toEqual([]);
	});

	it('cuts off what reaches outside the field and says how much', () => {
		const shape = rect(-118.305, 47.126, -118.295, 47.132);
		const c = clipZone(shape, field, [], proj);
		if (!c.ok) throw new Error(c.error);
		const kept = rect(-118.305, 47.126, -118.3, 47.129);
		// Field edges are straight in the grid's projection (as the coverage engine draws them): the
		// field's north edge, a 1.5 km chord there, runs a few centimetres off the parallel 47.129.
		expect(rel(c.areaM2, areaM2(kept))).toBeLessThan(1e-4);
		expect(rel(c.outsideM2, areaM2(shape) - areaM2(kept))).toBeLessThan(1e-4);
		expect(clipNote(c, (m2) => `${Math.round(m2)} m²`)).toMatch(/^Cut off: \d+ m² outside the field\.$/);
	});

	it('leaves shared ground to the zone that was there first', () => {
		const first = { name: 'Wet corner', geometry: rect(-118.31, 47.122, -118.305, 47.125) as ZoneGeometry };
		const shape = rect(-118.307, 47.123, -118.302, 47.127);
		const c = clipZone(shape, field, [first], proj);
		if (!c.ok) throw new Error(c.error);
		const shared = rect(-118.307, 47.123, -118.305, 47.125);
		expect(c.overlaps).toHaveLength(1);
		expect(c.overlaps[0].name).toBe('Wet corner');
		expect(rel(c.overlaps[0].areaM2, areaM2(shared))).toBeLessThan(1e-6);
		// Not to 1e-9: a geodesic between two corners on one parallel bows towards the pole, so
		// geodesic rectangles cut along a parallel do not add up exactly.
		expect(rel(c.areaM2, areaM2(shape) - areaM2(shared))).toBeLessThan(1e-5);
		// Nothing of the new zone is left inside the old one.
		const left = intersection(c.geometry, first.geometry);
		expect(left ? areaM2(left) : 0).toBeLessThan(0.01);
		expect(clipNote(c, (m2) => `${Math.round(m2)} m²`)).toContain('already in “Wet corner”');
	});

	it('refuses a shape outside the field or inside another zone, saying which', () => {
		expect(clipZone(rect(-118.2, 47.2, -118.19, 47.21), field, [], proj)).toEqual({ ok: false, error: 'the shape lies outside the field' });
		const big = { name: 'Big', geometry: rect(-118.315, 47.121, -118.305, 47.127) as ZoneGeometry };
		expect(clipZone(rect(-118.31, 47.122, -118.309, 47.123), field, [big], proj)).toEqual({ ok: false, error: 'the shape lies wholly inside zone “Big”' });
	});

	it('a zone over the whole field is the field', () => {
		const c = clipZone(rect(-118.33, 47.11, -118.29, 47.14), field, [], proj);
		if (!c.ok) throw new Error(c.error);
		expect(rel(c.areaM2, areaM2(field))).toBeLessThan(1e-9);
	});
});

// ------------------------------------------------------------------ hotspot zones, against JTS
const gf = new GeometryFactory();
type J = { getArea(): number; intersection(o: J): J };

describe('hotspotZones', () => {
	const { grid } = describeField(field, 10);
	const k = fieldScaleFactor(field);

	function jtsArea(cells: { col: number; row: number }[], bufferM: number): number {
		const c = grid.cellSizeM;
		const sq = cells.map(({ col, row }) => {
			const x0 = col * c, y0 = row * c;
			return gf.createPolygon(gf.createLinearRing([[x0, y0], [x0 + c, y0], [x0 + c, y0 + c], [x0, y0 + c], [x0, y0]].map(([x, y]) => new Coordinate(x, y))));
		});
		const params = new BufferParameters();
		params.setJoinStyle(BufferParameters.JOIN_MITRE);
		const grown = BufferOp.bufferOp(UnaryUnionOp.union(gf.createGeometryCollection(sq)), bufferM, params) as J;
		const [ring] = projectRings(grid.proj, field);
		const coords: Coordinate[] = [];
		for (let i = 0; i < ring.length; i += 2) coords.push(new Coordinate(ring[i] - grid.originX, ring[i + 1] - grid.originY));
		const boundary = gf.createPolygon(gf.createLinearRing(coords)) as J;
		// Projected area over k² is the ellipsoidal area (DESIGN.md; coverage-notes.md).
		return grown.intersection(boundary).getArea() / (k * k);
	}

	it('merges neighbouring cells, grows them by the buffer and cuts them to the field (JTS reference)', () => {
		// A 3 x 2 block, a lone cell, and a strip of cells along the field's south edge, which runs
		// a little north of the grid's bottom row there (UTM meets a parallel at a slant).
		const cells = [
			...[10, 11, 12].flatMap((col) => [20, 21].map((row) => ({ col, row }))),
			{ col: 40, row: 40 },
			{ col: 148, row: 0 }, { col: 149, row: 0 }, { col: 150, row: 0 }
		];
		const made = hotspotZones({ cells, grid, boundary: field, existing: [], bufferM: 5, minAreaM2: 0 });
		expect(made.zones).toHaveLength(3);
		expect(made.zones.map((z) => z.cells.length).sort()).toEqual([1, 3, 6]);
		const total = made.zones.reduce((s, z) => s + z.areaM2, 0);
		// GeographicLib against JTS-in-UTM / k²: the 0.05 % the design allows.
		expect(rel(total, jtsArea(cells, 5))).toBeLessThan(1e-5);
		// The block by hand: 30 x 20 m of cells grown by 5 m each side is (30 + 10) x (20 + 10) m =
		// 1200 m² in UTM, 1200 / k² on the ground (k: UTM point scale, Snyder 1987 eq. 8-11).
		const block = made.zones.find((z) => z.cells.length === 6)!;
		expect(rel(block.areaM2, (40 * 30) / (k * k))).toBeLessThan(1e-5);
		expect(made.zones[0].areaM2).toBeGreaterThanOrEqual(made.zones[1].areaM2);
		// The strip was cut to the field: less than its 40 x 20 m grown square.
		const strip = made.zones.find((z) => z.cells.length === 3)!;
		expect(strip.areaM2).toBeLessThan(500);
		expect(strip.outsideM2).toBeGreaterThan(300);
	});

	it('leaves out zones under the minimum area and those wholly inside existing zones', () => {
		const cells = [{ col: 40, row: 40 }, ...[10, 11, 12].flatMap((col) => [20, 21].map((row) => ({ col, row })))];
		// The lone cell grown by 5 m is 20 x 20 m = 400 m²: under 500 m².
		const made = hotspotZones({ cells, grid, boundary: field, existing: [], bufferM: 5, minAreaM2: 500 });
		expect(made.zones).toHaveLength(1);
		expect(made.tooSmall).toBe(1);
		const cover = { name: 'Old', geometry: made.zones[0].geometry };
		const again = hotspotZones({ cells, grid, boundary: field, existing: [cover], bufferM: 5, minAreaM2: 500 });
		expect(again.zones).toHaveLength(0);
		expect(again.insideExisting).toBe(1);
	});

	it('a patch that closes on itself at a corner is a valid zone: a hole touching its outline', () => {
		// A ring of 3 x 3 cells without its middle and its north-east corner: the empty middle
		// meets the outside only at that corner's inner point.
		const cells = [[0, 0], [1, 0], [2, 0], [0, 1], [2, 1], [0, 2], [1, 2]].map(([c, r]) => ({ col: 60 + c, row: 50 + r }));
		const made = hotspotZones({ cells, grid, boundary: field, existing: [], bufferM: 0, minAreaM2: 0 });
		expect(made.zones).toHaveLength(1);
		const g = made.zones[0].geometry;
		expect(g.type === 'Polygon' && g.coordinates.length).toBe(2);
		// Fields refuse rings that touch; zones accept them, and still refuse a real crossing.
		expect(checkBoundary(g)).toMatchObject({ error: expect.stringContaining('crosses itself') });
		expect(checkBoundary(g, { allowTouching: true })).toMatchObject({ areaM2: expect.any(Number) });
		const bowTie = { type: 'Polygon', coordinates: [[[-118.31, 47.12], [-118.305, 47.125], [-118.305, 47.12], [-118.31, 47.125], [-118.31, 47.12]]] };
		expect(checkBoundary(bowTie, { allowTouching: true })).toMatchObject({ error: expect.stringContaining('crosses itself') });
		// Two squares touching at a corner: two parts, neither inside the other.
		const touching = { type: 'MultiPolygon', coordinates: [rect(-118.31, 47.12, -118.309, 47.121).coordinates, rect(-118.309, 47.121, -118.308, 47.122).coordinates] };
		expect(checkBoundary(touching, { allowTouching: true })).toMatchObject({ areaM2: expect.any(Number) });
	});

	it('checks its options', () => {
		expect(() => hotspotZones({ cells: [], grid, boundary: field, existing: [], bufferM: -1, minAreaM2: 0 })).toThrow(/buffer/);
		expect(() => hotspotZones({ cells: [], grid, boundary: field, existing: [], bufferM: 5, minAreaM2: -1 })).toThrow(/minimum area/);
	});
});
