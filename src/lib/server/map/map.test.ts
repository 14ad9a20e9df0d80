// The map's data functions and tiles against real rows. All figures are invented; expected values
// follow by hand from the definitions in the map contract (issue 5): share = sprayed / covered
// summed over the season's applications, cover = the largest single application's covered
// fraction, hot = share ≥ threshold and cover ≥ 0.5; blocks below z15 (2 x 2 at z14, doubling per zoom out).
import { gunzipSync } from 'node:zlib';
import { beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import { db } from '$lib/server/db';
import { farms, mapTileSets, tankMixes } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { grant, join, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { addApplication as addApplicationTo, addField as addFieldTo, square, type FieldRow } from '$lib/server/testing/results-fixtures';
import { cellCornersLngLat, gridBbox as mapBbox, tilesForBbox } from '$lib/geo/tiles';
import type { GridSpec } from '$lib/compute/types';
import { cellHistory, cellRows, mapContext, meta, summary, type CellRegion } from './data';
import { datasetKey, parseMapQuery, type Dataset, type MapQuery } from './dataset';
import { cellsTile, clearTileCache, drawCellsTile, parseTileParams, type RowsFor } from './tiles';
import { farmsNeedingPyramid, pyramidDatasets, renderFarmPyramid } from './pyramid-render';
import { seededRandom } from '$lib/compute/seeded-random';
import { basemapTile } from './basemap';
import { LruCache } from './cache';

type Row = FieldRow;
let farm: Awaited<ReturnType<typeof makeFarm>>;
let manager: Actor;
let landlord: Actor;
let fieldA: Row;
let fieldB: Row;
const apps: Record<string, string> = {};

const addField = (name: string, boundary: ReturnType<typeof square>) => addFieldTo(farm.id, name, boundary);
async function addApplication(key: string, fieldId: string, mixId: string, day: string, cells: [number, number, number, number, number][]) {
	apps[key] = await addApplicationTo(farm.id, fieldId, mixId, day, cells);
}

const season = (s: number, threshold: number | null = null): MapQuery => ({ dataset: { kind: 'season', season: s }, thresholdPercent: threshold });

/** The tile at zoom z holding the centre of cell (col, row). */
function tileOf(grid: GridSpec, col: number, row: number, z: number) {
	const c = cellCornersLngLat(grid, col, row);
	const lng = (c[0][0] + c[2][0]) / 2;
	const lat = (c[0][1] + c[2][1]) / 2;
	return tilesForBbox([lng, lat, lng, lat], z)[0];
}

async function features(actor: Actor, q: MapQuery, [z, x, y]: number[]) {
	const tile = await cellsTile(actor, q, z, x, y);
	if (!tile.body) return null;
	// The bytes are gzip as served; @mapbox/vector-tile reads the MVT inside.
	const layer = new VectorTile(new PbfReader(gunzipSync(tile.body))).layers.cells;
	return Array.from({ length: layer.length }, (_, i) => layer.feature(i).properties);
}

beforeAll(async () => {
	farm = await makeFarm();
	const [m, l] = [await makeUser(), await makeUser()];
	await join(farm.id, m.id, 'manager');
	await join(farm.id, l.id, 'landlord');
	const f = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	manager = { user: m, farm: f, role: 'manager' };
	landlord = { user: l, farm: f, role: 'landlord' };
	fieldA = await addField('Invented A', square(0, 0, 0.01, 0.01));
	fieldB = await addField('Invented B', square(0.03, 0, 0.04, 0.01));
	await grant(farm.id, l.id, fieldA.id);
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Invented mix', carrierRateLPerM2: 0.01 }).returning();
	// [col, row, area, covered, sprayed] in m2
	await addApplication('a2024', fieldA.id, mix.id, '2024-05-01', [[2, 3, 100, 100, 5], [3, 3, 100, 100, 50]]);
	await addApplication('a2025a', fieldA.id, mix.id, '2025-05-01', [[2, 3, 100, 80, 20], [3, 3, 100, 40, 30]]);
	await addApplication('a2025b', fieldA.id, mix.id, '2025-06-01', [[2, 3, 100, 100, 40]]);
	await addApplication('b2025', fieldB.id, mix.id, '2025-05-02', [[5, 5, 100, 100, 100]]);
});

describe('cell tiles', () => {
	it('full-resolution cells from z15: share over the season, cover the best single pass, hot', async () => {
		const props = await features(manager, season(2025), tileOf(fieldA.grid, 2, 3, 15));
		const byCell = new Map(props!.map((p) => [`${p.col},${p.row}`, p]));
		// (2,3): sprayed 20 + 40 over covered 80 + 100 = 33.3 %; cover max(0.8, 1.0); hot at 20 %.
		expect(byCell.get('2,3')).toEqual({ field: fieldA.id, col: 2, row: 3, share: 33.3, cover: 1, hot: 1 });
		// (3,3): 30 / 40 = 75 % but only 40 % of the cell driven over: not a hotspot.
		expect(byCell.get('3,3')).toEqual({ field: fieldA.id, col: 3, row: 3, share: 75, cover: 0.4, hot: 0 });
		expect(props!.length).toBe(2);
	});

	it('blocks below z15, doubling per zoom out, covered-area-weighted', async () => {
		// At z13 a block is 4 x 4: block (0,0) holds (2,3) and (3,3): 90 / 220 = 40.9 %; cover (100·1 + 100·0.4) / 200 = 0.7.
		expect((await features(manager, season(2025), tileOf(fieldA.grid, 2, 3, 13)))!.filter((p) => p.field === fieldA.id)).toEqual([{ field: fieldA.id, col: 0, row: 0, span: 4, share: 40.9, cover: 0.7, hot: 1 }]);
		// At z14, 2 x 2: (2,3) and (3,3) fall in blocks (2,2), with the same figures.
		expect((await features(manager, season(2025), tileOf(fieldA.grid, 2, 3, 14)))!.filter((p) => p.field === fieldA.id)).toEqual([{ field: fieldA.id, col: 2, row: 2, span: 2, share: 40.9, cover: 0.7, hot: 1 }]);
		// At z11, 16 x 16.
		expect((await features(manager, season(2025), tileOf(fieldA.grid, 2, 3, 11)))!.filter((p) => p.field === fieldA.id)).toEqual([{ field: fieldA.id, col: 0, row: 0, span: 16, share: 40.9, cover: 0.7, hot: 1 }]);
	});

	it('no cells below z11', async () => {
		const [, x, y] = tileOf(fieldA.grid, 2, 3, 10);
		expect((await cellsTile(manager, season(2025), 10, x, y)).body).toBeNull();
	});

	it('one application shows its own cells only', async () => {
		const q: MapQuery = { dataset: { kind: 'application', applicationId: apps.a2025a }, thresholdPercent: null };
		const props = await features(manager, q, tileOf(fieldA.grid, 2, 3, 16));
		expect(props!.find((p) => p.col === 2)).toEqual({ field: fieldA.id, col: 2, row: 3, share: 25, cover: 0.8, hot: 1 });
	});

	it('a threshold in the query previews hotspots without saving', async () => {
		const props = await features(manager, season(2025, 50), tileOf(fieldA.grid, 2, 3, 15));
		expect(props!.find((p) => p.col === 2)!.hot).toBe(0);
		const [row] = await db.select({ t: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, farm.id));
		expect(row.t).toBe(20);
	});

	it('compare: later share, change in points, status and the smaller cover', async () => {
		const q: MapQuery = { dataset: { kind: 'compare', earlier: 2024, later: 2025 }, thresholdPercent: null };
		const props = await features(manager, q, tileOf(fieldA.grid, 2, 3, 15));
		const byCol = new Map(props!.map((p) => [p.col, p]));
		// (2,3): 5 % in 2024, 33.3 % in 2025 and hot only then: new (2).
		expect(byCol.get(2)).toEqual({ field: fieldA.id, col: 2, row: 3, share: 33.3, change: 28.3, status: 2, cover: 1 });
		// (3,3): 50 % and fully covered in 2024 (hot), 75 % at cover 0.4 in 2025 (not hot): cleared (3).
		expect(byCol.get(3)).toEqual({ field: fieldA.id, col: 3, row: 3, share: 75, change: 25, status: 3, cover: 0.4 });
	});

	it("a landlord's tile holds granted fields only", async () => {
		const overB = tileOf(fieldB.grid, 5, 5, 15);
		expect(await features(manager, season(2025), overB)).toHaveLength(1);
		expect(await features(landlord, season(2025), overB)).toBeNull();
		expect(await features(landlord, season(2025), tileOf(fieldA.grid, 2, 3, 15))).toHaveLength(2);
		// Not even through the application of a field the landlord was not granted.
		const q: MapQuery = { dataset: { kind: 'application', applicationId: apps.b2025 }, thresholdPercent: null };
		expect(await features(landlord, q, overB)).toBeNull();
	});

	it('the ETag holds while nothing changes and moves with new results or a saved threshold', async () => {
		const [z, x, y] = tileOf(fieldA.grid, 2, 3, 16);
		const first = await cellsTile(manager, season(2025), z, x, y);
		expect((await cellsTile(manager, season(2025), z, x, y)).etag).toBe(first.etag);
		expect((await cellsTile(landlord, season(2025), z, x, y)).etag).not.toBe(first.etag);
		await db.execute(sql`update applications set computed_at = now() + interval '1 second' where id = ${apps.a2025b}`);
		const recomputed = await cellsTile(manager, season(2025), z, x, y);
		expect(recomputed.etag).not.toBe(first.etag);
		await db.update(farms).set({ hotspotThresholdPercent: 50 }).where(eq(farms.id, farm.id));
		const saved = await cellsTile(manager, season(2025), z, x, y);
		expect(saved.etag).not.toBe(recomputed.etag);
		expect(await features(manager, season(2025), [z, x, y])).toContainEqual(expect.objectContaining({ col: 2, hot: 0 }));
		await db.update(farms).set({ hotspotThresholdPercent: 20 }).where(eq(farms.id, farm.id));
	});
});

describe('summary, meta and one cell', () => {
	it('summarises a season per field', async () => {
		const s = await summary(manager, season(2025));
		// Hot: A(2,3) and B(5,5) (100 % at full cover); A(3,3) is under half covered.
		expect({ cells: s.cells, hotspots: s.hotspots, hotspotAreaM2: s.hotspotAreaM2 }).toEqual({ cells: 3, hotspots: 2, hotspotAreaM2: 200 });
		expect(s.perField.map((f) => [f.name, f.coveredM2, f.sprayedM2, f.hotspots])).toEqual([
			['Invented A', 220, 90, 1],
			['Invented B', 100, 100, 1]
		]);
		expect(s.perField[0].sharePercent).toBeCloseTo((100 * 90) / 220, 9);
		const l = await summary(landlord, season(2025));
		expect(l.perField.map((f) => f.name)).toEqual(['Invented A']);
	});

	it('summarises a comparison', async () => {
		const s = await summary(manager, { dataset: { kind: 'compare', earlier: 2024, later: 2025 }, thresholdPercent: null });
		expect(s.compare).toEqual({ earlier: 2024, later: 2025, persistent: 0, new: 2, cleared: 1, persistentAreaM2: 0, newAreaM2: 200, clearedAreaM2: 100 });
	});

	it("a cell's history, newest season first; none for a landlord outside the grant", async () => {
		const h = await cellHistory(manager, fieldA.id, 2, 3);
		expect(h!.history.map((s) => [s.season, s.applications, s.coveredM2, s.sprayedM2])).toEqual([
			[2025, 2, 180, 60],
			[2024, 1, 100, 5]
		]);
		expect(h!.history[0].volumeL).toBeCloseTo(0.6, 12);
		expect(h!.areaM2).toBe(100);
		expect(await cellHistory(landlord, fieldB.id, 5, 5)).toBeNull();
		expect(await cellHistory(manager, fieldA.id, fieldA.grid.cols, 0)).toBeNull();
		expect((await cellHistory(manager, fieldA.id, 0, 0))!.history).toEqual([]);
	});

	it('meta: seasons newest first, applications in scope, who may set the threshold', async () => {
		const m = await meta(manager);
		expect(m.seasons).toEqual([2025, 2024]);
		expect(m.applications).toHaveLength(4);
		expect(m.canSetThreshold).toBe(true);
		expect(m.bounds).toEqual([0, 0, 0.04, 0.01]);
		const l = await meta(landlord);
		expect(l.applications.map((a) => a.fieldName)).toEqual(['Invented A', 'Invented A', 'Invented A']);
		expect(l.canSetThreshold).toBe(false);
		expect(l.bounds).toEqual([0, 0, 0.01, 0.01]);
	});
});

describe('query and tile parameters', () => {
	it('names what is wrong', () => {
		expect(parseMapQuery(new URLSearchParams('season=2025&compare=2024,2025'))).toEqual({ error: expect.stringContaining('exactly one') });
		expect(parseMapQuery(new URLSearchParams('season=25'))).toEqual({ error: expect.stringContaining('four-digit') });
		expect(parseMapQuery(new URLSearchParams('compare=2025,2024'))).toEqual({ error: expect.stringContaining('earlier season first') });
		expect(parseMapQuery(new URLSearchParams('season=2025&threshold=0.1'))).toEqual({ error: expect.stringContaining('threshold') });
		expect(parseMapQuery(new URLSearchParams('season=2025&threshold=35'))).toEqual({ dataset: { kind: 'season', season: 2025 }, thresholdPercent: 35 });
		expect(parseTileParams({ z: '15', x: '3', y: '7.pbf' })).toEqual({ z: 15, x: 3, y: 7 });
		expect(parseTileParams({ z: '1', x: '2', y: '0' })).toBeNull();
		expect(parseTileParams({ z: '1', x: '0', y: '0.png' })).toBeNull();
	});
});

describe('LRU cache', () => {
	it('evicts the least recently used entry by count and by bytes', () => {
		const c = new LruCache<string>(2, 10, (v) => v.length);
		c.set('a', 'xx');
		c.set('b', 'yy');
		c.get('a');
		c.set('c', 'zz');
		expect([c.get('a'), c.get('b'), c.get('c')]).toEqual(['xx', undefined, 'zz']);
		c.set('d', 'wwwwwwwww');
		expect(c.bytes).toBeLessThanOrEqual(10);
		expect(c.get('d')).toBe('wwwwwwwww');
	});
});

describe('basemap', () => {
	it('has land and borders where Natural Earth has them, and nothing mid-ocean or past z10', async () => {
		// z3 tile 1/3 spans 135°W-90°W, 0-41°N: Mexico and the south-western United States and their border (Natural Earth 50m).
		const america = await basemapTile(3, 1, 3);
		const layers = new VectorTile(new PbfReader(gunzipSync(america.body!))).layers;
		expect(Object.keys(layers).sort()).toEqual(['borders', 'land']);
		// z6 tile 31/36 spans 5.6°W-0°, 27°S-22°S: open South Atlantic (St Helena, the nearest land, is at 15.9°S).
		expect((await basemapTile(6, 31, 36)).body).toBeNull();
		expect((await basemapTile(11, 0, 0)).body).toBeNull();
	}, 30_000);
});

describe('pre-rendered pyramid', () => {
	const live = async (q: MapQuery, [z, x, y]: number[]) => {
		const ctx = await mapContext(manager);
		const rowsFor = ((d: Dataset, regions: CellRegion[], span: number) => cellRows(manager, d, regions, span)) as RowsFor;
		return drawCellsTile(ctx.fields, q.dataset, q.thresholdPercent ?? ctx.savedThresholdPercent, z, x, y, rowsFor);
	};

	beforeAll(async () => {
		// A denser patch on field B in 2024 (seeded), so blocks below z15 aggregate many cells.
		const random = seededRandom(7);
		const cells: [number, number, number, number, number][] = [];
		for (let col = 0; col < 24; col++) for (let row = 0; row < 24; row++) if (random() < 0.6) cells.push([col, row, 100, 100 * random(), 30 * random()]);
		await addApplication('b2024', fieldB.id, (await db.select().from(tankMixes).where(eq(tankMixes.farmId, farm.id)))[0].id, '2024-06-02', cells);
	});

	it('lists each season and the pairs of the latest seasons', () => {
		expect(pyramidDatasets([2024, 2026, 2025, 2025]).map(datasetKey)).toEqual(['s2026', 's2025', 's2024', 'c2025-2026', 'c2024-2026', 'c2024-2025']);
	});

	it('stores tiles byte for byte equal to the live ones, and serves them while the data stands', async () => {
		expect(await farmsNeedingPyramid()).toContain(farm.id);
		const sets = await renderFarmPyramid(farm.id);
		expect(sets!.map((s) => s.dataset).sort()).toEqual(['c2024-2025', 's2024', 's2025']);
		expect(await farmsNeedingPyramid()).not.toContain(farm.id);
		expect(await renderFarmPyramid(farm.id)).toEqual([]);
		// A renamed field changes no tile: nothing to draw again.
		await db.execute(sql`update fields set name = name || ' (renamed)', updated_at = now() where id = ${fieldB.id}`);
		expect(await farmsNeedingPyramid()).not.toContain(farm.id);

		const compare: MapQuery = { dataset: { kind: 'compare', earlier: 2024, later: 2025 }, thresholdPercent: null };
		let compared = 0;
		for (const q of [season(2024), season(2025), compare]) {
			for (const z of [11, 12, 13, 14, 15, 16, 17, 18]) {
				for (const [, x, y] of tilesForBbox(mapBbox(fieldB.grid), z)) {
					const served = await cellsTile(manager, q, z, x, y);
					const expected = await live(q, [z, x, y]);
					if (q.dataset.kind === 'compare' && z > 16) {
						expect(served.etag.startsWith('"p-')).toBe(false); // past the stored zooms: drawn live
					} else {
						expect(served.etag.startsWith('"p-')).toBe(true);
					}
					expect(served.body === null ? null : Buffer.compare(served.body, expected!)).toBe(expected === null ? null : 0);
					if (served.body) compared++;
				}
			}
		}
		expect(compared).toBeGreaterThan(20);
	});

	it('is not used for a landlord, a threshold preview, one application or data newer than the set', async () => {
		const [z, x, y] = tileOf(fieldA.grid, 2, 3, 15);
		expect((await cellsTile(manager, season(2025), z, x, y)).etag.startsWith('"p-')).toBe(true);
		expect((await cellsTile(landlord, season(2025), z, x, y)).etag.startsWith('"p-')).toBe(false);
		expect((await cellsTile(manager, season(2025, 35), z, x, y)).etag.startsWith('"p-')).toBe(false);
		const app: MapQuery = { dataset: { kind: 'application', applicationId: apps.a2025b }, thresholdPercent: null };
		expect((await cellsTile(manager, app, z, x, y)).etag.startsWith('"p-')).toBe(false);

		const setIds = async () => new Map((await db.select().from(mapTileSets).where(eq(mapTileSets.farmId, farm.id))).map((s) => [s.dataset, s.id]));
		const before = await setIds();
		await db.execute(sql`update applications set computed_at = now() + interval '2 seconds' where id = ${apps.a2025b}`);
		expect((await cellsTile(manager, season(2025), z, x, y)).etag.startsWith('"p-')).toBe(false);
		expect(await farmsNeedingPyramid()).toContain(farm.id);
		// Only what draws on 2025 is drawn again.
		expect((await renderFarmPyramid(farm.id))!.map((s) => s.dataset).sort()).toEqual(['c2024-2025', 's2025']);
		const after = await setIds();
		expect(after.get('s2024')).toBe(before.get('s2024'));
		expect(after.get('s2025')).not.toBe(before.get('s2025'));
		clearTileCache(); // the live tile drawn meanwhile is still right, and the LRU would answer first
		const again = await cellsTile(manager, season(2025), z, x, y);
		expect(again.etag.startsWith('"p-')).toBe(true);
		// The older version's sets are gone.
		const [{ n }] = await db.execute<{ n: number }>(sql`select count(*)::int as n from map_tile_sets where farm_id = ${farm.id}`);
		expect(n).toBe(3);
	});
});
