// The zone export read back by an independent reader: the `shapefile` npm package (Mike
// Bostock's streaming reader, not the writer's author) and fflate's unzip. Areas are compared
// with GeographicLib's geodesic polygon area; attributes field by field. Where GDAL is installed
// (Debian's gdal-bin), its ogrinfo reads the zip too: the reference reader of the GIS world.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { unzipSync, strFromU8 } from 'fflate';
import type { MultiPolygon, Polygon } from 'geojson';
import { read } from 'shapefile';
import { areaM2 } from './area';
import { WGS84_PRJ, zonesGeojson, zonesShapefile, type ExportZone } from './zone-export';

const square = (w: number, s: number, side: number): Polygon => ({
	type: 'Polygon',
	coordinates: [[[w, s], [w + side, s], [w + side, s + side], [w, s + side], [w, s]]]
});

const withHole: Polygon = {
	type: 'Polygon',
	coordinates: [
		[[-118.31, 47.12], [-118.305, 47.12], [-118.305, 47.123], [-118.31, 47.123], [-118.31, 47.12]],
		[[-118.309, 47.121], [-118.309, 47.122], [-118.306, 47.122], [-118.306, 47.121], [-118.309, 47.121]]
	]
};
const twoParts: MultiPolygon = { type: 'MultiPolygon', coordinates: [square(-118.3, 47.12, 0.001).coordinates, square(-118.297, 47.12, 0.0015).coordinates] };

function zone(id: number, name: string, geometry: Polygon | MultiPolygon, rate: number | null, description = ''): ExportZone {
	return {
		id: `00000000-0000-4000-8000-00000000000${id}`,
		name,
		description,
		fieldName: 'North Flat',
		areaM2: areaM2(geometry),
		source: 'hotspots',
		season: 2026,
		targetRateLPerM2: rate,
		geometry
	};
}

const zones = [
	zone(1, 'Wet corner – Nordhang', withHole, 0.01, 'Residual, "split" rate; then scout'),
	zone(2, 'Two patches', twoParts, 0),
	zone(3, 'No rate yet', square(-118.29, 47.125, 0.002), null, 'x'.repeat(300))
];

describe('zone shapefile', () => {
	const zip = unzipSync(zonesShapefile(zones, 'north-flat-zones'));

	it('holds .shp, .shx, .dbf, a WGS84 .prj and a UTF-8 .cpg', () => {
		expect(Object.keys(zip).sort()).toEqual(['north-flat-zones.cpg', 'north-flat-zones.dbf', 'north-flat-zones.prj', 'north-flat-zones.shp', 'north-flat-zones.shx']);
		expect(strFromU8(zip['north-flat-zones.prj'])).toBe(WGS84_PRJ);
		expect(strFromU8(zip['north-flat-zones.prj'])).toContain('GEOGCS["GCS_WGS_1984"');
		expect(strFromU8(zip['north-flat-zones.cpg'])).toBe('UTF-8');
	});

	it('reads back with an independent reader: same areas (GeographicLib) and attributes', async () => {
		const fc = await read(zip['north-flat-zones.shp'], zip['north-flat-zones.dbf'], { encoding: 'utf-8' });
		expect(fc.features).toHaveLength(3);
		fc.features.forEach((f, i) => {
			const geometry = f.geometry as Polygon | MultiPolygon;
			// The reader rebuilds holes and parts from the ring order: equal areas mean the order was right.
			expect(Math.abs(areaM2(geometry) / zones[i].areaM2 - 1)).toBeLessThan(1e-9);
			const p = f.properties as Record<string, unknown>;
			expect(p.zone_id).toBe(zones[i].id);
			expect(p.name).toBe(zones[i].name);
			expect(p.field).toBe('North Flat');
			expect(p.season).toBe(2026);
			expect(p.area_ha).toBeCloseTo(zones[i].areaM2 / 1e4, 3);
			// 1 acre = 4046.8564224 m2 (NIST SP 811).
			expect(p.area_ac).toBeCloseTo(zones[i].areaM2 / 4046.8564224, 3);
		});
		const [a, b, c] = fc.features.map((f) => f.properties as Record<string, unknown>);
		expect(a.descr).toBe('Residual, "split" rate; then scout');
		// 0.01 L/m2 = 100 L/ha = 10.69 gal/ac (1 gal = 3.785411784 L, NIST SP 811).
		expect(a.rate_l_ha).toBe(100);
		expect(a.rate_galac).toBeCloseTo(100 / 9.353956, 3);
		expect(b.rate_l_ha).toBe(0);
		expect(c.rate_l_ha).toBeNull();
		// A description longer than a dBase field is cut at 254 bytes, not mid-character.
		expect((c.descr as string).length).toBe(254);
		expect((fc.features[1].geometry as MultiPolygon).type).toBe('MultiPolygon');
		expect((fc.features[0].geometry as Polygon).coordinates).toHaveLength(2);
	});

	it('cuts long UTF-8 text at a character boundary', async () => {
		const long = zone(4, 'é'.repeat(200), square(-118.29, 47.125, 0.001), null);
		const z = unzipSync(zonesShapefile([long], 'z'));
		const fc = await read(z['z.shp'], z['z.dbf'], { encoding: 'utf-8' });
		expect(fc.features[0].properties!.name).toBe('é'.repeat(127));
	});
});

const hasOgrinfo = (() => {
	try {
		execFileSync('ogrinfo', ['--version'], { stdio: 'ignore' });
		return true;
	} catch {
		return false;
	}
})();

describe('zone shapefile read by GDAL', () => {
	it.skipIf(!hasOgrinfo)('ogrinfo finds WGS 84, the UTF-8 names, the numeric rates and every polygon', () => {
		const dir = mkdtempSync(join(tmpdir(), 'pb-zones-ogr-'));
		writeFileSync(join(dir, 'zones.zip'), zonesShapefile(zones, 'north-flat-zones'));
		const out = execFileSync('ogrinfo', ['-ro', '-al', `/vsizip/${join(dir, 'zones.zip')}`], { encoding: 'utf8' });
		expect(out).toContain('Geometry: Polygon');
		expect(out).toContain('Feature Count: 3');
		expect(out).toContain('ID["EPSG",4326]');
		expect(out).toMatch(/rate_l_ha: Real/);
		expect(out).toContain('name (String) = Wet corner – Nordhang');
		expect(out).toContain('rate_l_ha (Real) = 100.000');
		expect(out).toMatch(/rate_l_ha \(Real\) = \(null\)/);
		expect(out.match(/MULTIPOLYGON|POLYGON \(\(/g)?.length).toBe(3);
	});
});

describe('zone GeoJSON', () => {
	it('carries the same attributes and the stored geometry', () => {
		const fc = zonesGeojson(zones);
		expect(fc.features.map((f) => f.properties.name)).toEqual(zones.map((z) => z.name));
		expect(fc.features[0].geometry).toEqual(withHole);
		expect(fc.features[0].properties.rate_l_ha).toBe(100);
		expect(fc.features[2].properties.rate_galac).toBeNull();
	});
});
