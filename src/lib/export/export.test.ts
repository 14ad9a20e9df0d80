// Exports read back by independent readers: papaparse for CSV (and RFC 4180's rules checked on the
// raw text), the `shapefile` package (not the writer's code) for shapefiles, with polygon areas
// from GeographicLib (geographiclib-geodesic, through src/lib/geo/area.ts) on both sides.
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { unzipSync, strFromU8 } from 'fflate';
import * as shapefile from 'shapefile';
import type { Polygon } from 'geojson';
import { areaM2 } from '$lib/geo/area';
import { cellCornersLngLat } from '$lib/geo/tiles';
import { gridSpecFor } from '$lib/geo/projection';
import { toCsv } from './csv';
import { cellsCsv, cellsGeoJson, cellAttributes, type ExportCell } from './cells';
import { shapefileZip } from './shapefile';

describe('CSV (RFC 4180, IETF 2005)', () => {
	it('ends records in CRLF, quotes fields with commas, quotes or line breaks and doubles their quotes', () => {
		const text = toCsv(['name', 'area_m2'], [['North, "Flat"', 12.5], ['Two\nlines', 3], ['=SUM(A1)', -4]]);
		expect(text).toBe('name,area_m2\r\n"North, ""Flat""",12.5\r\n"Two\nlines",3\r\n"\'=SUM(A1)",-4\r\n');
		const back = Papa.parse<string[]>(text.trimEnd(), { newline: '\r\n' }).data;
		expect(back[1]).toEqual(['North, "Flat"', '12.5']);
		expect(back[2]).toEqual(['Two\nlines', '3']);
	});
});

// Two invented cells of a UTM zone 14N grid (a Kansas-like latitude), one of them hot.
const grid = gridSpecFor({ type: 'Polygon', coordinates: [[[-98.52, 38.51], [-98.5, 38.51], [-98.5, 38.52], [-98.52, 38.52], [-98.52, 38.51]]] });
const cell = (col: number, row: number, extra: Partial<ExportCell> = {}): ExportCell => ({
	fieldName: 'Schoolhouse — Nörd',
	fieldId: '00000000-0000-4000-8000-000000000001',
	col,
	row,
	corners: cellCornersLngLat(grid, col, row),
	areaM2: 100,
	coveredM2: 100,
	sprayedM2: 25,
	volumeL: 0.25,
	cover: 1,
	hot: true,
	...extra
});
const cells = [cell(3, 4), cell(4, 4, { sprayedM2: 5, hot: false, status: 'cleared' })];

describe('cells as CSV and GeoJSON', () => {
	it('has units in the header names and the figures per cell', () => {
		const rows = Papa.parse<Record<string, string>>(cellsCsv(cells, '2025', false), { header: true, skipEmptyLines: true }).data;
		expect(Object.keys(rows[0])).toEqual(['field', 'field_id', 'col', 'row', 'season', 'area_m2', 'cov_m2', 'spr_m2', 'share_pct', 'vol_l', 'cover_fr', 'hotspot', 'centre_lng_deg', 'centre_lat_deg']);
		expect(rows[0]).toMatchObject({ field: 'Schoolhouse — Nörd', col: '3', row: '4', share_pct: '25', hotspot: '1' });
		expect(rows[1]).toMatchObject({ share_pct: '5', hotspot: '0' });
	});

	it('GeoJSON polygons close their rings and wind anticlockwise (RFC 7946 section 3.1.6)', () => {
		const fc = cellsGeoJson(cells, '2024-2025', true);
		const ring = fc.features[0].geometry.coordinates[0];
		expect(ring[0]).toEqual(ring[4]);
		let twiceArea = 0;
		for (let i = 0; i < 4; i++) twiceArea += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
		expect(twiceArea).toBeGreaterThan(0);
		expect(fc.features[1].properties).toMatchObject({ status: 'cleared', season: '2024-2025' });
	});
});

describe('zipped shapefile, read back with the independent `shapefile` package', () => {
	it('holds .shp .shx .dbf .prj .cpg and a units file; geometry, areas and attributes come back', async () => {
		const fc = cellsGeoJson(cells, '2025', true);
		const files = unzipSync(shapefileZip('cells', fc, cellAttributes('2025', true)));
		expect(Object.keys(files).sort()).toEqual(['cells.cpg', 'cells.dbf', 'cells.prj', 'cells.shp', 'cells.shx', 'cells.txt']);
		expect(strFromU8(files['cells.prj'])).toMatch(/^GEOGCS\["GCS_WGS_1984"/);
		expect(strFromU8(files['cells.txt'])).toMatch(/area_m2\s+Cell area inside the field \[m2\]/);
		const back = await shapefile.read(files['cells.shp'].slice().buffer, files['cells.dbf'].slice().buffer, { encoding: 'utf-8' });
		expect(back.features).toHaveLength(2);
		for (const [i, f] of back.features.entries()) {
			expect(f.geometry.type).toBe('Polygon');
			// The reader turns shapefile rings (outer clockwise) back into GeoJSON; the area is the cell's either way.
			const expected = areaM2(fc.features[i].geometry);
			expect(areaM2(f.geometry as Polygon)).toBeCloseTo(expected, 6);
			// A 10 m UTM square is 100 m² on the grid; on the ellipsoid it differs by the square of the scale factor (k ≈ 0.9996-1.0004 in a zone).
			expect(expected).toBeGreaterThan(99.9);
			expect(expected).toBeLessThan(100.1);
		}
		expect(back.features[0].properties).toMatchObject({ field: 'Schoolhouse — Nörd', col: 3, row: 4, share_pct: 25, hotspot: 1 });
		expect(back.features[1].properties).toMatchObject({ status: 'cleared', share_pct: 5 });
	});

	it('refuses attribute names the DBF cannot hold and empty files', () => {
		const fc = cellsGeoJson(cells, '2025', false);
		expect(() => shapefileZip('x', fc, [{ name: 'treated_share', description: '' }])).toThrow(/longer than the DBF's ten characters/);
		expect(() => shapefileZip('x', { type: 'FeatureCollection', features: [] }, [])).toThrow(/nothing to write/);
	});
});
