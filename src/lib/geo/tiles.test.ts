import { describe, expect, it } from 'vitest';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import { fromGeojsonVt } from '@maplibre/vt-pbf';
import geodesic from 'geographiclib-geodesic';
import proj4 from 'proj4';
import type { GridSpec } from '../compute/types';
import { bboxesIntersect, cellCornersLngLat, cellRangeInBbox, cellRingDrawer, gridBbox, isTile, lngLatToTilePixel, tileBbox, tilesForBbox, TILE_EXTENT } from './tiles';
import { utmScaleFactor, utmZoneForLngLat } from './projection';

// An invented field grid in UTM 11N near 47.1 N, 118.3 W: 10 m cells, 60 x 40.
const zone = utmZoneForLngLat(-118.3, 47.1);
const [ox, oy] = proj4('EPSG:4326', zone.proj).forward([-118.3, 47.1]).map((v) => Math.floor(v / 10) * 10);
const grid: GridSpec = { proj: zone.proj, epsg: zone.epsg, cellSizeM: 10, originX: ox, originY: oy, cols: 60, rows: 40 };

describe('tile bounds', () => {
	it('z0 spans the Web Mercator square: ±180° and ±85.0511°', () => {
		// EPSG:3857's latitude limit atan(sinh(π)) (OpenStreetMap wiki, "Slippy map tilenames").
		const [w, s, e, n] = tileBbox(0, 0, 0);
		expect([w, e]).toEqual([-180, 180]);
		expect(n).toBeCloseTo(85.0511287798, 9);
		expect(s).toBeCloseTo(-85.0511287798, 9);
	});

	it('z1 tiles meet at the equator and the prime meridian', () => {
		// The XYZ scheme: x grows east, y grows south (OpenStreetMap wiki, "Slippy map tilenames").
		const b = tileBbox(1, 1, 0);
		expect(b[0]).toBe(0);
		expect(b[1]).toBeCloseTo(0, 12);
		expect(b[2]).toBe(180);
		expect(tilesForBbox([-1, -1, 1, 1], 1)).toEqual([[1, 0, 0], [1, 1, 0], [1, 0, 1], [1, 1, 1]]);
	});

	it('rejects names outside the pyramid', () => {
		expect(isTile(2, 3, 3)).toBe(true);
		expect(isTile(2, 4, 0)).toBe(false);
		expect(isTile(-1, 0, 0)).toBe(false);
		expect(isTile(1.5, 0, 0)).toBe(false);
	});

	it('a tile corner lands on 0 and the extent', () => {
		const [w, s, e, n] = tileBbox(15, 5650, 11480);
		const nw = lngLatToTilePixel(15, 5650, 11480, w, n);
		const se = lngLatToTilePixel(15, 5650, 11480, e, s);
		expect(nw[0]).toBeCloseTo(0, 6);
		expect(nw[1]).toBeCloseTo(0, 6);
		expect(se[0]).toBeCloseTo(TILE_EXTENT, 6);
		expect(se[1]).toBeCloseTo(TILE_EXTENT, 6);
	});
});

describe('cells in tiles', () => {
	it('a cell drawn into a tile decodes, with @mapbox/vector-tile, back to its proj4 corners', () => {
		const [lng, lat] = cellCornersLngLat(grid, 12, 7)[0];
		for (const z of [15, 18]) {
			const [[, x, y]] = tilesForBbox([lng + 1e-6, lat + 1e-6, lng + 1e-6, lat + 1e-6], z);
			const ring = cellRingDrawer(grid, z, x, y)(12, 7)!;
			const bytes = fromGeojsonVt({ cells: { features: [{ type: 3, geometry: [ring], tags: { col: 12 } }] } }, { version: 2, extent: TILE_EXTENT });
			const feature = new VectorTile(new PbfReader(bytes)).layers.cells.feature(0);
			const decoded = (feature.toGeoJSON(x, y, z).geometry as GeoJSON.Polygon).coordinates[0];
			const expected = cellCornersLngLat(grid, 12, 7);
			// Decoded order: sw, nw, ne, se, sw; corners in cellCornersLngLat: sw, se, ne, nw.
			const order = [0, 3, 2, 1, 0];
			// One tile unit is 1/4096 of the tile: at z15 about 0.2 m here, so 1e-5 degrees is ample.
			decoded.forEach((p, i) => {
				expect(p[0]).toBeCloseTo(expected[order[i]][0], z === 15 ? 5 : 6);
				expect(p[1]).toBeCloseTo(expected[order[i]][1], z === 15 ? 5 : 6);
			});
			// MVT 2.1 § 4.3.4.4: an exterior ring has positive area by the surveyor's formula in tile coordinates.
			const pts = feature.loadGeometry()[0];
			let twiceArea = 0;
			for (let i = 0; i + 1 < pts.length; i++) twiceArea += pts[i].x * pts[i + 1].y - pts[i + 1].x * pts[i].y;
			expect(twiceArea).toBeGreaterThan(0);
		}
	});

	it("a cell's corners enclose its ellipsoidal area: cell² / k²", () => {
		// GeographicLib (Karney 2013) area vs the UTM point scale factor (Snyder 1987, eq. 8-11).
		const corners = cellCornersLngLat(grid, 30, 20);
		const polygon = geodesic.Geodesic.WGS84.Polygon(false);
		for (const [lng, lat] of corners) polygon.AddPoint(lat, lng);
		const area = Math.abs(polygon.Compute(false, true).area!);
		const [clng, clat] = corners[0];
		const k = utmScaleFactor(zone, clng, clat);
		expect(area / (100 / (k * k))).toBeCloseTo(1, 6);
	});

	it('the range of a tile holds every cell with a corner inside the tile', () => {
		const b = gridBbox(grid);
		for (const [z, x, y] of [...tilesForBbox(b, 16), ...tilesForBbox(b, 17)]) {
			const bbox = tileBbox(z, x, y);
			const range = cellRangeInBbox(grid, bbox);
			for (let col = 0; col < grid.cols; col++) {
				for (let row = 0; row < grid.rows; row++) {
					const inside = cellCornersLngLat(grid, col, row).some(([lng, lat]) => lng > bbox[0] && lng < bbox[2] && lat > bbox[1] && lat < bbox[3]);
					if (!inside) continue;
					expect(range, `${z}/${x}/${y} cell ${col},${row}`).not.toBeNull();
					expect(col >= range!.col0 && col <= range!.col1 && row >= range!.row0 && row <= range!.row1, `${z}/${x}/${y} cell ${col},${row}`).toBe(true);
				}
			}
		}
	});

	it('a tile away from the grid has no range, and the drawer drops cells off the tile', () => {
		expect(cellRangeInBbox(grid, tileBbox(16, 0, 0))).toBeNull();
		const b = gridBbox(grid);
		expect(bboxesIntersect(b, tileBbox(16, 0, 0))).toBe(false);
		const [[z, x, y]] = tilesForBbox(b, 18);
		const draw = cellRingDrawer(grid, z, x, y, { buffer: 0 });
		const drawn = [];
		for (let col = 0; col < grid.cols; col++) for (let row = 0; row < grid.rows; row++) if (draw(col, row)) drawn.push([col, row]);
		// A z18 tile here is about 104 m wide (40075 km · cos 47.1° / 2^18): a small part of the 600 x 400 m grid.
		expect(drawn.length).toBeGreaterThan(0);
		expect(drawn.length).toBeLessThan(grid.cols * grid.rows / 4);
	});

	it('neighbouring cells share corners exactly, so rounding leaves no gaps', () => {
		const [lng, lat] = cellCornersLngLat(grid, 20, 20)[0];
		const [[z, x, y]] = tilesForBbox([lng, lat, lng, lat], 16);
		const draw = cellRingDrawer(grid, z, x, y);
		const a = draw(20, 20)!;
		const east = draw(21, 20)!;
		const north = draw(20, 21)!;
		expect(east[0]).toEqual(a[3]); // east's sw is a's se
		expect(north[0]).toEqual(a[1]); // north's sw is a's nw
		const block = draw(20, 20, 4)!;
		expect(block[0]).toEqual(a[0]);
		expect(block[2]).toEqual(draw(23, 23)![2]);
	});
});
