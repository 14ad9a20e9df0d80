import { readFileSync } from 'node:fs';
import geodesic from 'geographiclib-geodesic';
import type { MultiPolygon, Polygon, Position } from 'geojson';
import { unzipSync, zipSync } from 'fflate';
import { describe, expect, test } from 'vitest';
import { parseBoundaryFile, type BoundaryResult } from './boundaries';
import { utf8 } from './testing';

const fixtures = new URL('../../../sample-data/fixtures/', import.meta.url);
const fixture = (name: string) => new Uint8Array(readFileSync(new URL(name, fixtures)));
const gdal = readFileSync(new URL('gdal-version.txt', fixtures), 'utf8').trim();
const source = JSON.parse(readFileSync(new URL('boundaries.geojson', fixtures), 'utf8'));

/** Ellipsoidal area by GeographicLib (Karney 2013), outer rings minus holes. */
function areaM2(g: Polygon | MultiPolygon): number {
	const ringArea = (ring: Position[]) => {
		const p = geodesic.Geodesic.WGS84.Polygon(false);
		for (const [lng, lat] of ring.slice(0, -1)) p.AddPoint(lat, lng);
		return Math.abs(p.Compute(false, true).area!);
	};
	const polys = g.type === 'Polygon' ? [g.coordinates] : g.coordinates;
	return polys.reduce((s, rings) => s + ringArea(rings[0]) - rings.slice(1).reduce((h, r) => h + ringArea(r), 0), 0);
}

function ok(r: BoundaryResult) {
	if (!r.ok) throw new Error(`expected ok, got ${r.error.message}`);
	return r;
}

/** Every source vertex has a vertex in the result within tol degrees (ring order may change). */
function expectSameVertices(got: Polygon | MultiPolygon, want: Polygon | MultiPolygon, tol: number) {
	const flat = (g: Polygon | MultiPolygon) => (g.type === 'Polygon' ? [g.coordinates] : g.coordinates).flat(2);
	const have = flat(got);
	for (const p of flat(want)) {
		const best = Math.min(...have.map((q) => Math.max(Math.abs(q[0] - p[0]), Math.abs(q[1] - p[1]))));
		expect(best).toBeLessThan(tol);
	}
	expect(have.length).toBe(flat(want).length);
}

describe(`boundary fixtures written by GDAL ogr2ogr (${gdal})`, () => {
	const expectMatchesSource = (r: BoundaryResult, tol: number, areaTol: number) => {
		const res = ok(r);
		expect(res.features).toHaveLength(2);
		res.features.forEach((f, i) => {
			const want = source.features[i].geometry;
			expect(f.geometry.type).toBe(want.type);
			expectSameVertices(f.geometry, want, tol);
			expect(Math.abs(areaM2(f.geometry) / areaM2(want) - 1)).toBeLessThan(areaTol);
		});
		// The first field keeps its hole.
		expect((res.features[0].geometry as Polygon).coordinates).toHaveLength(2);
		return res;
	};

	test('GeoJSON source (RFC 7946) reads as is', () => {
		const r = expectMatchesSource(parseBoundaryFile('boundaries.geojson', fixture('boundaries.geojson')), 1e-12, 1e-12);
		expect(r.nameAttribute).toBe('field_name');
		expect(r.features.map((f) => f.name)).toEqual(['Invented North Quarter', 'Invented Creek Pieces']);
		expect(r.attributeNames).toEqual(['field_name', 'farm_no']);
		// ~0.87 km x 0.89 km less a hole: GeographicLib area of the source, not of our output.
		expect(areaM2(r.features[0].geometry)).toBeCloseTo(areaM2(source.features[0].geometry), 3);
	});

	test('zipped shapefile in WGS84', () => {
		const r = expectMatchesSource(parseBoundaryFile('boundary-wgs84.zip', fixture('boundary-wgs84.zip')), 1e-12, 1e-12);
		expect(r.format).toBe('shapefile');
		expect(r.features[1].name).toBe('Invented Creek Pieces');
	});

	test('zipped shapefile in UTM 14N with its .prj is reprojected with proj4', () => {
		// GDAL (PROJ) projected it, proj4js projects back: they agree to well under a millimetre.
		expectMatchesSource(parseBoundaryFile('boundary-utm14n.zip', fixture('boundary-utm14n.zip')), 1e-8, 1e-7);
	});

	test('zipped shapefile without .prj in metres asks for a CRS, then reads with opts.epsg', () => {
		const r = parseBoundaryFile('boundary-utm14n-noprj.zip', fixture('boundary-utm14n-noprj.zip'));
		expect(r.ok).toBe(false);
		if (r.ok) return;
		expect(r.needsCrs).toBe(true);
		expect(r.error.message).toMatch(/not degrees .* choose an EPSG code/);
		const again = expectMatchesSource(parseBoundaryFile('boundary-utm14n-noprj.zip', fixture('boundary-utm14n-noprj.zip'), { epsg: 32614 }), 1e-8, 1e-7);
		expect(again.warnings).toContain('coordinates were reprojected from EPSG:32614');
	});

	test('KML', () => {
		const r = expectMatchesSource(parseBoundaryFile('boundaries.kml', fixture('boundaries.kml')), 1e-12, 1e-12);
		expect(r.format).toBe('kml');
		expect(r.nameAttribute).toBe('name');
		expect(r.features[0].name).toBe('Invented North Quarter');
		expect(r.attributeNames).not.toContain('styleUrl');
	});
});

const square = [[-98.52, 38.51], [-98.51, 38.51], [-98.51, 38.518], [-98.52, 38.518], [-98.52, 38.51]];
const fc = (...geometries: object[]) =>
	utf8(JSON.stringify({ type: 'FeatureCollection', features: geometries.map((geometry, i) => ({ type: 'Feature', properties: { name: `Invented ${i + 1}` }, geometry })) }));

describe('invalid and odd polygons', () => {
	test('a bare geometry, an unclosed ring and repeated points are repaired with warnings', () => {
		const open = [square[0], square[1], square[1], square[2], square[3]];
		const r = ok(parseBoundaryFile('b.geojson', utf8(JSON.stringify({ type: 'Polygon', coordinates: [open] }))));
		expect(r.warnings).toEqual(['feature 1: ring 0 was not closed; closed it', 'feature 1: ring 0 repeated 1 point(s); removed them']);
		expect(areaM2(r.features[0].geometry)).toBeCloseTo(areaM2({ type: 'Polygon', coordinates: [square] }), 3);
	});

	test('a bow-tie ring is split at the crossing, area kept (GeographicLib)', () => {
		const bow = [[-98.52, 38.51], [-98.51, 38.518], [-98.51, 38.51], [-98.52, 38.518], [-98.52, 38.51]];
		const r = ok(parseBoundaryFile('b.geojson', fc({ type: 'Polygon', coordinates: [bow] })));
		expect(r.warnings[0]).toMatch(/^feature 1 \('Invented 1'\): ring 0 crosses itself: the edge from vertex 0 meets the edge from vertex 2; split it into 2 polygons/);
		const g = r.features[0].geometry as MultiPolygon;
		expect(g.type).toBe('MultiPolygon');
		// The two triangles of the bow tie, meeting at the centre (-98.515, ~38.514).
		const tri = (a: number[], b: number[]) => ({ type: 'Polygon' as const, coordinates: [[a, b, [-98.515, 38.514], a]] });
		const want = areaM2(tri([-98.52, 38.51], [-98.52, 38.518])) + areaM2(tri([-98.51, 38.518], [-98.51, 38.51]));
		expect(Math.abs(areaM2(g) / want - 1)).toBeLessThan(1e-3);
	});

	test('a hairline spike is removed with a warning naming the vertex', () => {
		const spiked = [square[0], square[1], [-98.505, 38.51], square[1], square[2], square[3], square[0]];
		const r = ok(parseBoundaryFile('b.geojson', fc({ type: 'Polygon', coordinates: [spiked] })));
		expect(r.warnings).toContain("feature 1 ('Invented 1'): ring 0 doubled back on itself at vertex 2; removed that spike");
		expect(areaM2(r.features[0].geometry)).toBeCloseTo(areaM2({ type: 'Polygon', coordinates: [square] }), 3);
	});

	test('a hole crossing the outer ring is rejected naming rings and vertices', () => {
		const hole = [[-98.515, 38.512], [-98.505, 38.512], [-98.505, 38.514], [-98.515, 38.514], [-98.515, 38.512]];
		const r = parseBoundaryFile('b.geojson', fc({ type: 'Polygon', coordinates: [square, hole] }));
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.error).toEqual({ file: 'b.geojson', row: null, column: null, message: "feature 1 ('Invented 1'): ring 0 (edge from vertex 1) crosses ring 1 (edge from vertex 0); the outline is invalid and could not be repaired safely" });
	});

	test('a self-crossing outer ring with a hole is rejected, not guessed at', () => {
		const bow = [[-98.52, 38.51], [-98.51, 38.518], [-98.51, 38.51], [-98.52, 38.518], [-98.52, 38.51]];
		const hole = [[-98.519, 38.513], [-98.518, 38.513], [-98.518, 38.514], [-98.519, 38.513]];
		const r = parseBoundaryFile('b.geojson', fc({ type: 'Polygon', coordinates: [bow, hole] }));
		expect(r.ok || r.error.message).toMatch(/ring 0 crosses itself: the edge from vertex 0 meets the edge from vertex 2; the outline is invalid/);
	});

	test('a ring with fewer than three distinct points', () => {
		const r = parseBoundaryFile('b.geojson', fc({ type: 'Polygon', coordinates: [[square[0], square[1], square[0]]] }));
		expect(r.ok || r.error.message).toBe("feature 1 ('Invented 1'): ring 0 has fewer than 3 distinct points");
	});

	test('projected GeoJSON without a CRS asks for one', () => {
		const r = parseBoundaryFile('b.geojson', fc({ type: 'Polygon', coordinates: [[[542000, 4262000], [543000, 4262000], [543000, 4263000], [542000, 4262000]]] }));
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.needsCrs).toBe(true);
	});

	test('a KML with no polygons', () => {
		const kml = `<?xml version="1.0"?><kml xmlns="http://www.opengis.net/kml/2.2"><Document>
			<Placemark><name>Invented gate</name><Point><coordinates>-98.515,38.511</coordinates></Point></Placemark>
			<Placemark><name>Invented track</name><LineString><coordinates>-98.515,38.511 -98.514,38.512</coordinates></LineString></Placemark>
		</Document></kml>`;
		const r = parseBoundaryFile('points.kml', utf8(kml));
		expect(r.ok || r.error).toEqual({ file: 'points.kml', row: null, column: null, message: 'this KML file holds no polygons (only 1 Point, 1 LineString)' });
	});

	test('GPX: a closed track becomes a polygon, an open one does not', () => {
		const pts = (ring: number[][]) => ring.map(([lng, lat]) => `<trkpt lat="${lat}" lon="${lng}"></trkpt>`).join('');
		const gpx = (ring: number[][]) => utf8(`<?xml version="1.0"?><gpx version="1.1" creator="invented" xmlns="http://www.topografix.com/GPX/1/1"><trk><name>Invented walk</name><trkseg>${pts(ring)}</trkseg></trk></gpx>`);
		const r = ok(parseBoundaryFile('walk.gpx', gpx(square)));
		expect(r.features[0].name).toBe('Invented walk');
		expect(areaM2(r.features[0].geometry)).toBeCloseTo(areaM2({ type: 'Polygon', coordinates: [square] }), 3);
		const open = parseBoundaryFile('walk.gpx', gpx(square.slice(0, 3)));
		expect(open.ok || open.error.message).toMatch(/^this GPX file holds no polygons \(only 1 LineString\); a track or route counts as a boundary only when it ends within 10 m of its start$/);
	});

	test('broken inputs get a clear message', () => {
		const msg = (r: BoundaryResult) => (r.ok ? 'ok' : r.error.message);
		expect(msg(parseBoundaryFile('b.geojson', utf8('{"type":')))).toMatch(/^is not valid JSON/);
		expect(msg(parseBoundaryFile('b.kml', utf8('<kml><Document>')))).toMatch(/^is not well-formed XML \(unclosed xml tag/);
		expect(msg(parseBoundaryFile('b.txt', utf8('hello')))).toMatch(/is not a boundary file/);
		expect(msg(parseBoundaryFile('b.geojson', new Uint8Array()))).toBe('is empty');
	});

	// Shrunk counterexamples from boundaries.fuzz.test.ts (these crashed with raw TypeErrors).
	test('malformed polygon coordinates are refused naming the feature', () => {
		const msg = (geometry: unknown) => {
			const r = parseBoundaryFile('b.geojson', utf8(JSON.stringify({ type: 'FeatureCollection', features: [{ type: 'Feature', properties: { name: 'Invented' }, geometry }] })));
			return r.ok ? 'ok' : r.error;
		};
		expect(msg({ type: 'Polygon', coordinates: [] })).toEqual({ file: 'b.geojson', row: 1, column: null, message: "feature 1 ('Invented'): a polygon has no rings" });
		expect(msg({ type: 'Polygon', coordinates: 'x' })).toMatchObject({ message: "feature 1 ('Invented'): a polygon has no rings" });
		expect(msg({ type: 'MultiPolygon', coordinates: [[[[0, 0], [1, 0], [1, 1], [0, 0]]], [[[0, 0], ['1', 0]]]] })).toMatchObject({ message: "feature 1 ('Invented'): part 2: ring 0 has a point that is not a pair of numbers" });
		expect(msg({ type: 'GeometryCollection', geometries: null })).toMatchObject({ message: "feature 1 ('Invented'): the GeometryCollection has no list of geometries" });
		let deep: unknown = { type: 'Polygon', coordinates: [square] };
		for (let d = 0; d < 12; d++) deep = { type: 'GeometryCollection', geometries: [deep] };
		expect(msg(deep)).toMatchObject({ message: "feature 1 ('Invented'): GeometryCollections are nested more than 8 deep" });
		// Two levels of nesting still read.
		expect(msg({ type: 'GeometryCollection', geometries: [{ type: 'GeometryCollection', geometries: [{ type: 'Polygon', coordinates: [square] }] }] })).toBe('ok');
	});

	// Found while fuzzing: a ring of many points in straight north-south lines took 7 s at 128,000
	// points (crossing checks go quadratic), so a 25 MB file could hold a server for minutes.
	test('polygons and files with too many points are refused with the count', () => {
		const ring = (n: number, dx = 0) => {
			const pts: number[][] = [];
			for (let i = 0; i < n; i++) pts.push([-98.52 + dx, 38.51 + (0.008 * i) / n]);
			for (let i = 0; i < n; i++) pts.push([-98.51 + dx, 38.518 - (0.008 * i) / n]);
			return [...pts, pts[0]];
		};
		const file = (rings: number[][][]) => utf8(JSON.stringify({ type: 'FeatureCollection', features: rings.map((r) => ({ type: 'Feature', properties: {}, geometry: { type: 'Polygon', coordinates: [r] } })) }));
		const big = parseBoundaryFile('b.geojson', file([ring(10_000)]));
		expect(big.ok || big.error).toEqual({ file: 'b.geojson', row: 1, column: null, message: 'feature 1: a polygon has 20001 points; at most 20000 are read per polygon (simplify it first)' });
		const many = parseBoundaryFile('b.geojson', file(Array.from({ length: 21 }, (_, j) => ring(5_000, j * 0.02))));
		expect(many.ok || many.error.message).toBe('holds more than 200000 boundary points; at most that many are read per file (split or simplify it)');
		const started = performance.now();
		expect(parseBoundaryFile('b.geojson', file([ring(9_999)])).ok).toBe(true);
		expect(performance.now() - started).toBeLessThan(5_000);
	});

	// Shrunk from boundaries.fuzz.test.ts (seed 519571944, case 76): bytes spliced into the .dbf
	// made its header declare 33,623,166 records; shpjs looped over them for 20 s.
	test('a .dbf whose header declares more records than the file holds is refused at once', () => {
		const entries = unzipSync(new Uint8Array(readFileSync('sample-data/fixtures/boundary-utm14n.zip')));
		const name = Object.keys(entries).find((k) => k.endsWith('.dbf'))!;
		const dbf = entries[name].slice();
		new DataView(dbf.buffer).setUint32(4, 33_623_166, true);
		const started = performance.now();
		const r = parseBoundaryFile('fields.zip', zipSync({ ...entries, [name]: dbf }));
		expect(performance.now() - started).toBeLessThan(2_000);
		expect(r.ok || r.error.message).toBe(`'fields_utm14n.dbf' is damaged: its header declares 33623166 records of ${new DataView(dbf.buffer).getUint16(10, true)} bytes, but the file holds ${dbf.length} bytes`);
	});
});
