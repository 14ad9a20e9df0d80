// Property-based fuzzing of the boundary reader used by field import and zone import
// (parseBoundaryFile: GeoJSON, zipped shapefile via shpjs, KML/GPX via @tmcw/togeojson). It
// promises never to throw; property: it returns features or a problem naming the file that is
// not toIssue's generic wrapper for a raw exception, within CASE_MS per case and HEAP_CAP_BYTES
// per property. More runs: FUZZ_RUNS=2000 npx vitest run src/lib/ingest/boundaries.fuzz.test.ts
import fc from 'fast-check';
import { unzipSync, zipSync } from 'fflate';
import { describe, expect, test } from 'vitest';
import { parseBoundaryFile } from './boundaries';
import { bounded, byteMutation, bytesOf, CRASH_PREFIX, fixture, fuzz, mutateBytes, nastyNumber, textOf, type Outcome } from './fuzz-support';

const GEOJSON = fixture('sample-data/fixtures/boundaries.geojson');
const KML = fixture('sample-data/fixtures/boundaries.kml');
const ZIPS = ['boundary-wgs84.zip', 'boundary-utm14n.zip', 'boundary-utm14n-noprj.zip'].map((n) => fixture(`sample-data/fixtures/${n}`));

function read(file: string, bytes: Uint8Array, epsg?: number): Promise<Outcome> {
	return bounded(file, () => {
		const r = parseBoundaryFile(file, bytes, { epsg });
		if (r.ok) {
			expect(r.features.length).toBeGreaterThan(0);
			for (const f of r.features) expect(['Polygon', 'MultiPolygon']).toContain(f.geometry.type);
			return { kind: 'ok' } as Outcome;
		}
		expect(r.error.file).toBe(file);
		if (r.error.message.startsWith(CRASH_PREFIX)) throw new Error(`raw exception reported as a problem: ${r.error.message}`);
		return { kind: 'problem', message: r.error.message } as Outcome;
	});
}

// GeoJSON geometries as a careless exporter might write them: numbers that are not finite or not
// numbers at all, rings left open, positions with one or three values, lat/lng swapped, and
// GeometryCollections nested inside each other.
const coord = fc.oneof(
	{ weight: 6, arbitrary: fc.double({ min: -180, max: 180, noNaN: true }) },
	{ weight: 1, arbitrary: fc.double() },
	{ weight: 1, arbitrary: nastyNumber },
	{ weight: 1, arbitrary: fc.constantFrom(null, true, [], {}) }
);
const position = fc.oneof({ weight: 8, arbitrary: fc.tuple(coord, coord) }, { weight: 1, arbitrary: fc.array(coord, { maxLength: 4 }) }, { weight: 1, arbitrary: fc.constantFrom(null, 5, 'x') });
const ring = fc.tuple(fc.array(position, { minLength: 0, maxLength: 8 }), fc.boolean()).map(([pts, close]) => (close && pts.length ? [...pts, pts[0]] : pts));
const { geometry } = fc.letrec<{ geometry: unknown }>((tie) => ({
	geometry: fc.oneof(
		{ depthSize: 'small', withCrossShrink: true },
		fc.record({ type: fc.constant('Polygon'), coordinates: fc.array(ring, { maxLength: 3 }) }),
		fc.record({ type: fc.constant('MultiPolygon'), coordinates: fc.array(fc.array(ring, { maxLength: 2 }), { maxLength: 3 }) }),
		fc.record({ type: fc.constantFrom('Point', 'LineString', 'Bogus'), coordinates: fc.oneof(position, fc.array(position, { maxLength: 4 })) }),
		fc.record({ type: fc.constant('GeometryCollection'), geometries: fc.oneof(fc.array(tie('geometry'), { maxLength: 3 }), fc.constantFrom(null, 'x', {})) }),
		fc.constantFrom(null, 'Polygon', 7, {})
	)
}));
const feature = fc.record({ type: fc.constant('Feature'), properties: fc.oneof(fc.dictionary(fc.string({ maxLength: 6 }), fc.jsonValue({ maxDepth: 1 }), { maxKeys: 3 }), fc.constantFrom(null, 'x', 3)), geometry });
const document = fc.oneof(
	fc.record({ type: fc.constant('FeatureCollection'), features: fc.array(feature, { maxLength: 4 }) }),
	feature,
	geometry,
	fc.record({ type: fc.constant('FeatureCollection'), features: fc.array(feature, { maxLength: 2 }), crs: fc.record({ type: fc.constant('name'), properties: fc.record({ name: fc.constantFrom('EPSG:32614', 'urn:ogc:def:crs:EPSG::99999', 'EPSG:0', 'EPSG:4326', 'junk') }) }) })
);

describe('boundary reader under fuzzing', () => {
	test('random bytes under every boundary file name', { timeout: 60_000 }, async () => {
		await fuzz(
			'boundaries/random-bytes',
			fc.tuple(fc.constantFrom('b.geojson', 'b.zip', 'b.kml', 'b.gpx', 'b.kmz', 'b'), fc.uint8Array({ maxLength: 2048 })),
			150,
			([name, bytes]) => read(name, bytes)
		);
	});

	test('generated GeoJSON: odd numbers, open rings, wrong arity, nested GeometryCollections', { timeout: 60_000 }, async () => {
		await fuzz('boundaries/generated-geojson', fc.tuple(document, fc.option(fc.constantFrom(32614, 4326, 3857, 99999), { nil: undefined })), 250, ([doc, epsg]) =>
			read('gen.geojson', bytesOf(JSON.stringify(doc)), epsg)
		);
	});

	test('the GeoJSON fixture damaged, and with longitude and latitude swapped', { timeout: 60_000 }, async () => {
		const swapped = JSON.stringify(JSON.parse(textOf(GEOJSON)), (k, v) => (Array.isArray(v) && v.length === 2 && v.every((n) => typeof n === 'number') ? [v[1], v[0]] : v));
		await fuzz('boundaries/geojson-mutations', fc.tuple(fc.boolean(), fc.array(byteMutation, { maxLength: 5 })), 150, ([swap, m]) =>
			read('fields.geojson', mutateBytes(swap ? bytesOf(swapped) : GEOJSON, m))
		);
	});

	test('the KML fixture damaged, and as GPX with tracks of random points', { timeout: 60_000 }, async () => {
		const gpx = fc.array(fc.tuple(fc.oneof(fc.double({ min: -90, max: 90, noNaN: true }), nastyNumber), fc.oneof(fc.double({ min: -180, max: 180, noNaN: true }), nastyNumber)), { maxLength: 8 }).map(
			(pts) => `<?xml version="1.0"?><gpx version="1.1" creator="fuzz"><trk><name>t</name><trkseg>${[...pts, ...pts.slice(0, 1)].map(([la, lo]) => `<trkpt lat="${la}" lon="${lo}"/>`).join('')}</trkseg></trk></gpx>`
		);
		await fuzz(
			'boundaries/kml-gpx',
			fc.oneof(fc.array(byteMutation, { maxLength: 5 }).map((m) => ['fields.kml', mutateBytes(KML, m)] as const), gpx.map((t) => ['walk.gpx', bytesOf(t)] as const)),
			150,
			([name, bytes]) => read(name, bytes)
		);
	});

	test('zipped shapefiles damaged, with parts left out, damaged inside, or wrong entries', { timeout: 60_000 }, async () => {
		await fuzz(
			'boundaries/shapefile-mutations',
			fc.tuple(fc.nat({ max: ZIPS.length - 1 }), fc.array(byteMutation, { maxLength: 3 }), fc.array(byteMutation, { maxLength: 3 }), fc.nat(), fc.nat(), fc.option(fc.constantFrom('../up.shp', 'x.kml', 'b/other.shp', 'a.dbf'), { nil: undefined }), fc.option(fc.integer({ min: 1, max: 40000 }), { nil: undefined })),
			150,
			([z, outer, inner, drop, damage, extra, epsg]) => {
				if (outer.length) return read('fields.zip', mutateBytes(ZIPS[z], outer), epsg);
				const entries = unzipSync(ZIPS[z]);
				const names = Object.keys(entries);
				const files: Record<string, Uint8Array> = {};
				names.forEach((n, i) => {
					if (i === drop % (names.length + 2)) return;
					files[n] = i === damage % names.length ? mutateBytes(entries[n], inner) : entries[n];
				});
				if (extra) files[extra] = entries[names[0]];
				return read('fields.zip', zipSync(files), epsg);
			}
		);
	});
});
