// The map's API and tiles through HTTP: scoping by role and farm, gzip, ETag and 304, 204 when empty.
import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { tilesForBbox, type Bbox } from '../../src/lib/geo/tiles';
import { unzipSync } from 'fflate';
import * as shapefile from 'shapefile';
import { people, signIn } from './helpers';

type FieldFeature = { properties: { id: string; name: string }; geometry: { type: 'Polygon'; coordinates: number[][][] } | { type: 'MultiPolygon'; coordinates: number[][][][] } };

async function fieldsOf(request: APIRequestContext): Promise<FieldFeature[]> {
	return (await (await request.get('/api/farms/tallowgrass/fields/geojson')).json()).features;
}

/** A z15 tile over the middle of the field's outline bbox. */
function tileOver(f: FieldFeature, z = 15): string {
	const positions = (f.geometry.type === 'Polygon' ? f.geometry.coordinates : f.geometry.coordinates.flat()).flat();
	const lngs = positions.map((p) => p[0]);
	const lats = positions.map((p) => p[1]);
	const lng = (Math.min(...lngs) + Math.max(...lngs)) / 2;
	const lat = (Math.min(...lats) + Math.max(...lats)) / 2;
	const [[, x, y]] = tilesForBbox([lng, lat, lng, lat] as Bbox, z);
	return `${z}/${x}/${y}`;
}

async function as(page: Page, who: string) {
	await page.context().clearCookies();
	await signIn(page, who);
	return page.request;
}

test('cell tiles: gzip MVT with an ETag for the manager, 204 for a landlord outside the grants, 404 for another farm', async ({ page, request }) => {
	expect((await request.get('/api/farms/tallowgrass/tiles/cells/15/0/0?season=2025')).status()).toBe(401);
	expect((await request.get('/api/basemap/3/1/3')).status()).toBe(401);

	const manager = await as(page, people.manager);
	const meta = await (await manager.get('/api/farms/tallowgrass/map/meta')).json();
	expect(meta.seasons).toEqual([2026, 2025, 2024]);
	expect(meta.canSetThreshold).toBe(true);
	const all = await fieldsOf(manager);
	const notGranted = all.find((f) => f.properties.name === 'Long Hill')!;
	const granted = all.find((f) => f.properties.name === 'North Flat')!;
	const overLongHill = `/api/farms/tallowgrass/tiles/cells/${tileOver(notGranted)}.pbf?season=2025`;

	const tile = await manager.get(overLongHill);
	expect(tile.status()).toBe(200);
	expect(tile.headers()['content-encoding']).toBe('gzip');
	expect(tile.headers()['content-type']).toBe('application/vnd.mapbox-vector-tile');
	expect(tile.headers()['cache-control']).toContain('private');
	// Playwright, like fetch, hands back the body un-gzipped: an MVT layer named "cells" is in it.
	expect((await tile.body()).includes(Buffer.from('cells'))).toBe(true);
	const etag = tile.headers()['etag'];
	const again = await manager.get(overLongHill, { headers: { 'if-none-match': etag } });
	expect(again.status()).toBe(304);

	const summary = await (await manager.get('/api/farms/tallowgrass/map/summary?season=2025')).json();
	expect(summary.perField.map((f: { name: string }) => f.name)).toContain('Long Hill');
	expect((await manager.get('/api/farms/tallowgrass/map/summary?season=25')).status()).toBe(400);
	expect((await manager.get(`/api/farms/tallowgrass/map/cell?field=${notGranted.properties.id}&col=10&row=10`)).status()).toBe(200);

	const basemap = await manager.get('/api/basemap/3/1/3');
	expect(basemap.status()).toBe(200);
	expect(basemap.headers()['content-encoding']).toBe('gzip');

	const landlord = await as(page, people.landlord);
	expect((await landlord.get(overLongHill)).status()).toBe(204);
	expect((await landlord.get(`/api/farms/tallowgrass/tiles/cells/${tileOver(granted)}?season=2025`)).status()).toBe(200);
	expect((await landlord.get(`/api/farms/tallowgrass/map/cell?field=${notGranted.properties.id}&col=10&row=10`)).status()).toBe(404);
	const landlordSummary = await (await landlord.get('/api/farms/tallowgrass/map/summary?season=2025')).json();
	expect(landlordSummary.perField.map((f: { name: string }) => f.name).sort()).toEqual(['North Flat', 'Schoolhouse']);
	const landlordMeta = await (await landlord.get('/api/farms/tallowgrass/map/meta')).json();
	expect(new Set(landlordMeta.applications.map((a: { fieldName: string }) => a.fieldName))).toEqual(new Set(['North Flat', 'Schoolhouse']));
	expect(landlordMeta.canSetThreshold).toBe(false);

	const other = await as(page, people.otherFarmManager);
	for (const path of [overLongHill, '/api/farms/tallowgrass/map/meta', '/api/farms/tallowgrass/map/summary?season=2025']) {
		expect((await other.get(path)).status(), path).toBe(404);
	}
});

test("the worker pre-renders the farm's seasons: tiles at the saved threshold come from the stored pyramid, previews are drawn live", async ({ page }) => {
	test.setTimeout(180_000);
	const manager = await as(page, people.manager);
	const [longHill] = (await fieldsOf(manager)).filter((f) => f.properties.name === 'Long Hill');
	const path = `/api/farms/tallowgrass/tiles/cells/${tileOver(longHill, 13)}.pbf`;
	// The worker draws the demo farm's pyramid in the background after the server starts.
	await expect
		.poll(async () => (await manager.get(`${path}?season=2024`)).headers().etag ?? '', { timeout: 150_000, intervals: [2000] })
		.toMatch(/^"p-/);
	const stored = await manager.get(`${path}?season=2024`);
	expect(stored.status()).toBe(200);
	expect(stored.headers()['content-encoding']).toBe('gzip');
	const preview = await manager.get(`${path}?season=2024&threshold=35`);
	expect(preview.status()).toBe(200);
	expect(preview.headers().etag).not.toMatch(/^"p-/);
});

test('exports: hotspots as a shapefile agree with the map figures; a landlord gets granted fields only; another farm gets nothing', async ({ page }) => {
	const manager = await as(page, people.manager);
	const summary = await (await manager.get('/api/farms/tallowgrass/map/summary?season=2025')).json();
	const shp = await manager.get('/api/farms/tallowgrass/exports/hotspots?season=2025&format=shp');
	expect(shp.status()).toBe(200);
	expect(shp.headers()['content-disposition']).toBe('attachment; filename="tallowgrass-2025-hotspots-shapefile.zip"');
	const files = unzipSync(new Uint8Array(await shp.body()));
	const back = await shapefile.read(files['tallowgrass-2025-hotspots.shp'].slice().buffer, files['tallowgrass-2025-hotspots.dbf'].slice().buffer, { encoding: 'utf-8' });
	expect(back.features.length).toBe(summary.hotspots);
	// Hotspot area: the sum of the cells' areas inside the field, as the map's summary counts it.
	const area = back.features.reduce((s, f) => s + Number(f.properties!.area_m2), 0);
	// Each area is written to the hundredth of a m²: the sum may differ by half of that per cell.
	expect(Math.abs(area - summary.hotspotAreaM2)).toBeLessThanOrEqual(0.005 * back.features.length);

	const csv = await manager.get('/api/farms/tallowgrass/exports/cells?compare=2025,2026&format=csv');
	const text = await csv.text();
	expect(text.split('\r\n')[0]).toBe('field,field_id,col,row,season,area_m2,cov_m2,spr_m2,share_pct,vol_l,cover_fr,hotspot,status,centre_lng_deg,centre_lat_deg');
	expect(text.endsWith('\r\n')).toBe(true);

	const landlord = await as(page, people.landlord);
	const granted = (await fieldsOf(landlord)).map((f) => f.properties.id).sort();
	const geo = await (await landlord.get('/api/farms/tallowgrass/exports/cells?season=2025&format=geojson')).json();
	expect([...new Set(geo.features.map((f: { properties: { field_id: string } }) => f.properties.field_id))].sort()).toEqual(granted);
	expect((await landlord.get('/api/farms/brennan-creek/exports/cells?season=2026&format=csv')).status()).toBe(404);
	expect((await landlord.get('/api/farms/tallowgrass/exports/cells?season=2025&format=xls')).status()).toBe(400);
});
