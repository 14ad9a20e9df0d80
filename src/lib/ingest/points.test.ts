import { readFileSync } from 'node:fs';
import { zipSync } from 'fflate';
import { describe, expect, test } from 'vitest';
import { readLog, readLogHeader } from './log';
import type { ColumnMapping } from './mapping';
import { utf8 } from './testing';

const fixtures = new URL('../../../sample-data/fixtures/', import.meta.url);
const fixture = (name: string) => new Uint8Array(readFileSync(new URL(name, fixtures)));
const gdal = readFileSync(new URL('gdal-version.txt', fixtures), 'utf8').trim();
// The invented source the shapefile was written from (make-fixtures.sh).
const source = JSON.parse(readFileSync(new URL('log-points.geojson', fixtures), 'utf8')) as {
	features: { properties: Record<string, string | number>; geometry: { coordinates: [number, number] } }[];
};

function expectedBits(props: Record<string, string | number>): number[] {
	const s = String(props.noz_a) + String(props.noz_b);
	const words = new Array(Math.ceil(s.length / 32)).fill(0);
	for (let k = 0; k < s.length; k++) if (s[k] === '1') words[k >> 5] = (words[k >> 5] | (1 << (k & 31))) >>> 0;
	return words;
}

describe(`point shapefile log written by GDAL ogr2ogr (${gdal})`, () => {
	test('header lists the dBASE fields and suggests nozzle states split over two text fields', async () => {
		const h = await readLogHeader('log-points.zip', fixture('log-points.zip'));
		expect(h.kind).toBe('shapefile');
		expect(h.headers).toEqual(['fix_time', 'noz_a', 'noz_b', 'speed_kmh', 'rate_l_ha']);
		expect(h.suggested.spray).toEqual({ kind: 'nozzles', columns: ['noz_a', 'noz_b'] });
		expect(h.suggested.position).toEqual({ kind: 'geometry', crs: null });
		expect(h.suggested.time).toEqual({ kind: 'iso', column: 'fix_time' });
		expect(h.suggested.speed).toEqual({ column: 'speed_kmh', unit: 'km/h' });
		expect(h.suggested.rate).toEqual({ column: 'rate_l_ha', unit: 'L/ha' });
		expect(h.preview[0][1]).toHaveLength(72);
	});

	test('fixes round-trip against the GeoJSON source', async () => {
		const h = await readLogHeader('log-points.zip', fixture('log-points.zip'));
		const r = await readLog('log-points.zip', fixture('log-points.zip'), h.suggested, { nozzleCount: 144 });
		expect(r.errors).toEqual([]);
		const f = r.fixes!;
		expect(f.count).toBe(source.features.length);
		source.features.forEach((feat, i) => {
			expect(f.lng[i]).toBeCloseTo(feat.geometry.coordinates[0], 9);
			expect(f.lat[i]).toBeCloseTo(feat.geometry.coordinates[1], 9);
			expect(f.timeS[i]).toBe(Date.parse(String(feat.properties.fix_time)) / 1000);
			expect(f.sourceRow[i]).toBe(i + 1);
			if (f.spray.kind !== 'nozzles') throw new Error('nozzles expected');
			expect([...f.spray.bits.subarray(i * 5, i * 5 + 5)]).toEqual(expectedBits(feat.properties));
		});
	});

	test('the same mapping reads the GeoJSON source itself', async () => {
		const h = await readLogHeader('log-points.geojson', fixture('log-points.geojson'));
		expect(h.kind).toBe('geojson');
		const r = await readLog('log-points.geojson', fixture('log-points.geojson'), h.suggested, { nozzleCount: 144 });
		expect(r.errors).toEqual([]);
		expect(r.fixes!.count).toBe(40);
		// 10.8 km/h = 3 m/s (NIST SP 811: 1 km/h = 1/3.6 m/s).
		expect(r.fixes!.speedMPerS![0]).toBeCloseTo(3, 6);
	});

	test('nozzle strings of the wrong length name the feature and both fields', async () => {
		const mapping: ColumnMapping = {
			time: { kind: 'iso', column: 'fix_time' },
			position: { kind: 'geometry' },
			spray: { kind: 'nozzles', columns: ['noz_a', 'noz_b'] }
		};
		const r = await readLog('log-points.zip', fixture('log-points.zip'), mapping, { nozzleCount: 120 });
		expect(r.fixes).toBeNull();
		expect(r.errors[0]).toEqual({ file: 'log-points.zip', row: 1, column: 'noz_a + noz_b', message: 'nozzle states have 144 characters; the machine has 120 nozzles' });
	});

	test('a zip without .shp or without .dbf is refused clearly', async () => {
		const files = new Map<string, Uint8Array>();
		const { unzipSync } = await import('fflate');
		for (const [k, v] of Object.entries(unzipSync(fixture('log-points.zip')))) files.set(k, v);
		const without = (ext: string) => zipSync(Object.fromEntries([...files].filter(([k]) => !k.endsWith(ext))));
		const noShp = await readLog('log.zip', without('.shp'), { time: null, position: null, spray: null });
		expect(noShp.errors).toEqual([{ file: 'log.zip', row: null, column: null, message: 'holds a .dbf but no .shp: the geometry file is missing from the zip' }]);
		const noDbf = await readLog('log.zip', without('.dbf'), { time: null, position: null, spray: null });
		expect(noDbf.errors[0].message).toBe("holds 'log_points.shp' but no 'log_points.dbf': the attribute file is missing from the zip");
		await expect(readLogHeader('log.zip', without('.dbf'))).rejects.toThrow(/log\.zip: holds 'log_points\.shp' but no 'log_points\.dbf'/);
	});

	test('a zip entry named with ../ is refused before reading', async () => {
		const r = await readLog('log.zip', zipSync({ '../log.shp': new Uint8Array(100) }), { time: null, position: null, spray: null });
		expect(r.errors[0].message).toBe("zip entry '../log.shp' climbs out of its folder with ..; refused");
	});

	test('GeoJSON point features: nozzle states stored as numbers are refused', async () => {
		const fc = { type: 'FeatureCollection', features: [{ type: 'Feature', properties: { t: 1715698800, n: 1001 }, geometry: { type: 'Point', coordinates: [-98.5, 38.5] } }] };
		const r = await readLog('log.geojson', utf8(JSON.stringify(fc)), { time: { kind: 'epoch', column: 't', unit: 's' }, position: { kind: 'geometry' }, spray: { kind: 'nozzles', columns: ['n'] } }, { nozzleCount: 4 });
		expect(r.errors[0]).toMatchObject({ row: 1, column: 'n', message: expect.stringMatching(/stored as a number, which loses leading zeros/) });
	});

	test('GeoJSON with lines instead of points', async () => {
		const fc = { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'LineString', coordinates: [[0, 0], [1, 1]] } }] };
		const r = await readLog('log.geojson', utf8(JSON.stringify(fc)), { time: null, position: null, spray: null });
		expect(r.errors[0]).toEqual({ file: 'log.geojson', row: 1, column: null, message: 'feature 1 is a LineString; an as-applied log holds points' });
	});

	// Shrunk counterexamples from log.fuzz.test.ts (these threw raw TypeErrors before).
	test('GeoJSON that is just null (or a number, or an array) is refused as not GeoJSON', async () => {
		for (const text of ['null', '7', '[1,2]']) {
			const r = await readLog('log.geojson', utf8(text), { time: null, position: null, spray: null });
			expect(r.errors).toEqual([{ file: 'log.geojson', row: null, column: null, message: 'is not a GeoJSON FeatureCollection or Feature' }]);
		}
	});

	test('a Point whose coordinates member is missing or not numbers names the feature', async () => {
		const point = (geometry: unknown) => utf8(JSON.stringify({ type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'Point', coordinates: [1, 2] } }, { type: 'Feature', properties: {}, geometry }] }));
		const mapping = { time: null, position: { kind: 'geometry' as const }, spray: null };
		let r = await readLog('log.geojson', point({ type: 'Point', 'coord#inates': [1, 2] }), mapping);
		expect(r.errors[0]).toEqual({ file: 'log.geojson', row: 2, column: null, message: 'feature 2 is a Point whose coordinates are not two numbers' });
		r = await readLog('log.geojson', point({ type: 'Point', coordinates: ['1', 2] }), mapping);
		expect(r.errors[0].message).toBe('feature 2 is a Point whose coordinates are not two numbers');
		r = await readLog('log.geojson', point({ type: 'MultiPoint', coordinates: [[1, 2], [3, 4]] }), mapping);
		expect(r.errors[0].message).toBe('feature 2 is a MultiPoint of 2 points; an as-applied log holds one point per feature');
	});
});
