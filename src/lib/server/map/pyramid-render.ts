// The cells pyramid, rendered off the request path: for each farm whose map data changed, a
// worker fetches every season's cells (and every comparison's) in two queries per dataset, draws
// every tile from z11 to z18 over the fields through the same drawCellsTile as the live route,
// and stores the non-empty ones in one transaction. Drawing a z12 tile live means aggregating a
// few square kilometres of cells in SQL per request (over a second under load); reading a stored
// one is an index lookup. Landlords' tiles, threshold previews and single applications stay live:
// they are scoped or rare, and their LRU serves repeats.
import { eq, sql } from 'drizzle-orm';
import { client, db } from '$lib/server/db';
import { mapTileSets, mapTiles } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { gridWorldCorners, tilesForBbox } from '$lib/geo/tiles';
import { blockAlign, cellRows, mapContext, type CellRegion, type CellRow, type CompareCellRow, type MapField } from './data';
import { datasetKey, type Dataset } from './dataset';
import { seasonsOf, storedVersionSql } from './pyramid';
import { CELLS_MIN_ZOOM, drawCellsTile, SPANS, type RowsFor } from './tiles';

/** The map's source stops at z16 and overzooms; seasons are stored to z18 for clients that ask anyway. */
export const PYRAMID_MAX_ZOOM = 18;
const COMPARE_MAX_ZOOM = 16;
const maxZoomOf = (d: Dataset) => (d.kind === 'compare' ? COMPARE_MAX_ZOOM : PYRAMID_MAX_ZOOM);
/** Comparisons are stored for every pair among this many latest seasons. */
const COMPARED_SEASONS = 4;

/** What every member but a landlord sees: the farm-wide scope the pyramid is drawn for. */
function farmWide(farmId: string): Actor {
	return { user: { id: '', email: '', name: '', units: 'metric' }, farm: { id: farmId, slug: '', name: '', currency: '' }, role: 'manager' } as Actor;
}

/** Seasons newest first, then the compared pairs (earlier, later) among the latest few. */
export function pyramidDatasets(seasons: number[]): Dataset[] {
	const sorted = [...new Set(seasons)].sort((a, b) => b - a);
	const out: Dataset[] = sorted.map((season) => ({ kind: 'season', season }));
	const recent = sorted.slice(0, COMPARED_SEASONS);
	for (let i = 0; i < recent.length; i++) for (let j = i + 1; j < recent.length; j++) out.push({ kind: 'compare', earlier: recent[j], later: recent[i] });
	return out;
}

/** Every tile from z11 to maxZoom that touches a field's grid, once each. */
export function pyramidTiles(mapFields: MapField[], maxZoom = PYRAMID_MAX_ZOOM): [number, number, number][] {
	const seen = new Set<string>();
	const out: [number, number, number][] = [];
	for (let z = CELLS_MIN_ZOOM; z <= maxZoom; z++) {
		for (const f of mapFields) {
			for (const t of tilesForBbox(f.bbox, z)) {
				const k = t.join('/');
				if (!seen.has(k)) {
					seen.add(k);
					out.push(t);
				}
			}
		}
	}
	return out;
}

type AnyRow = CellRow | CompareCellRow;

/** Rows fetched once for whole fields, answered per tile region from an index by field and row. */
function rowsInMemory(bySpan: Map<number, AnyRow[]>): RowsFor {
	const index = new Map<number, Map<string, Map<number, AnyRow[]>>>();
	for (const [span, rows] of bySpan) {
		const byField = new Map<string, Map<number, AnyRow[]>>();
		for (const r of rows) {
			let byRow = byField.get(r.fieldId);
			if (!byRow) byField.set(r.fieldId, (byRow = new Map()));
			let list = byRow.get(r.row);
			if (!list) byRow.set(r.row, (list = []));
			list.push(r);
		}
		index.set(span, byField);
	}
	return ((_d: Dataset, regions: CellRegion[], span: number) => {
		const byField = index.get(span);
		if (!byField) throw new Error(`pyramid: no rows fetched at span ${span}`);
		const out: AnyRow[] = [];
		for (const region of regions) {
			const byRow = byField.get(region.fieldId);
			if (!byRow) continue;
			for (let row = region.row0; row <= region.row1; row++) {
				for (const c of byRow.get(row) ?? []) if (c.col >= region.col0 && c.col <= region.col1) out.push(c);
			}
		}
		return out;
	}) as RowsFor;
}

export type RenderedSet = { dataset: string; tiles: number; stored: number; bytes: number; ms: number };

/**
 * Renders and stores the farm's datasets whose stored sets are missing or behind their data,
 * replacing older sets, and returns what it stored (nothing when all are current; null when
 * another worker holds the farm). A session advisory lock keeps two workers off one farm; each
 * dataset is written in its own short transaction, so nothing else waits on a render. The
 * version is read before the cells: if the data changes meanwhile, the set carries the old
 * version and is simply never served.
 */
export async function renderFarmPyramid(farmId: string): Promise<RenderedSet[] | null> {
	const key = `map-pyramid:${farmId}`;
	const conn = await client.reserve();
	try {
		const [{ ok }] = await conn<{ ok: boolean }[]>`select pg_try_advisory_lock(hashtext(${key})) as ok`;
		if (!ok) return null;
		try {
			return await renderUnlocked(farmId);
		} finally {
			await conn`select pg_advisory_unlock(hashtext(${key}))`;
		}
	} finally {
		conn.release();
	}
}

async function renderUnlocked(farmId: string): Promise<RenderedSet[]> {
	const actor = farmWide(farmId);
	const seasons = await db.execute<{ season: number }>(sql`select distinct season from applications where farm_id = ${farmId}`);
	const datasets = pyramidDatasets(seasons.map((s) => s.season));
	const wanted = new Map<string, string>();
	for (const d of datasets) {
		const [row] = await db.execute<{ v: string }>(sql`select ${storedVersionSql(sql`${farmId}::uuid`, seasonsOf(d))} as v`);
		wanted.set(datasetKey(d), row.v);
	}
	const ctx = await mapContext(actor);
	const stored = await db.select({ id: mapTileSets.id, dataset: mapTileSets.dataset, version: mapTileSets.version }).from(mapTileSets).where(eq(mapTileSets.farmId, farmId));
	const current = new Set<string>();
	for (const s of stored) {
		// Sets of datasets that no longer exist, and of older data, go.
		if (wanted.get(s.dataset) === s.version && !current.has(s.dataset)) current.add(s.dataset);
		else await db.delete(mapTileSets).where(eq(mapTileSets.id, s.id));
	}
	const todo = datasets.filter((d) => !current.has(datasetKey(d)));
	const whole = ctx.fields.map((f) => ({ fieldId: f.id, col0: 0, col1: f.grid.cols - 1, row0: 0, row1: f.grid.rows - 1 }));
	const corners = new Map(ctx.fields.map((f) => [f.id, gridWorldCorners(f.grid)]));
	const out: RenderedSet[] = [];
	for (const d of todo) {
		const started = performance.now();
		const tiles = pyramidTiles(ctx.fields, maxZoomOf(d));
		const bySpan = new Map<number, AnyRow[]>();
		for (const span of SPANS) bySpan.set(span, await cellRows(actor, d, whole.map((r) => ({ ...r, ...blockAlign(r, span) })), span));
		const rowsFor = rowsInMemory(bySpan);
		const bodies: { z: number; x: number; y: number; body: Buffer }[] = [];
		for (const [z, x, y] of tiles) {
			const body = await drawCellsTile(ctx.fields, d, ctx.savedThresholdPercent, z, x, y, rowsFor, corners);
			if (body) bodies.push({ z, x, y, body });
		}
		const bytes = bodies.reduce((s, b) => s + b.body.length, 0);
		const ms = Math.round(performance.now() - started);
		await db.transaction(async (tx) => {
			const [set] = await tx
				.insert(mapTileSets)
				.values({ farmId, dataset: datasetKey(d), thresholdPercent: ctx.savedThresholdPercent, version: wanted.get(datasetKey(d))!, minZoom: CELLS_MIN_ZOOM, maxZoom: maxZoomOf(d), tileCount: tiles.length, bytes, renderMs: ms })
				.returning({ id: mapTileSets.id });
			for (let i = 0; i < bodies.length; i += 500) {
				await tx.insert(mapTiles).values(bodies.slice(i, i + 500).map((b) => ({ setId: set.id, ...b })));
			}
		});
		out.push({ dataset: datasetKey(d), tiles: tiles.length, stored: bodies.length, bytes, ms });
	}
	return out;
}

/** Farms with a season whose stored tiles are missing or behind its data: what a worker should render next. One query for all farms. */
export async function farmsNeedingPyramid(): Promise<string[]> {
	const rows = await db.execute<{ id: string }>(sql`
		select fa.id from farms fa
		where exists (
			select 1 from (select distinct season from applications where farm_id = fa.id) s
			where not exists (
				select 1 from map_tile_sets m
				where m.farm_id = fa.id and m.dataset = 's' || s.season and m.version = ${storedVersionSql(sql`fa.id`, sql`season = s.season`)}))`);
	return rows.map((r) => r.id);
}
