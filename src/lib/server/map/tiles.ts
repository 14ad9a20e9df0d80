// Cell tiles for the weed-pressure map. A tile's bounds pick the fields it touches and each
// field's col/row range, the dataset's cells there are aggregated in PostgreSQL, and the squares
// are drawn in tile coordinates and encoded as Mapbox Vector Tile 2 with vt-pbf, gzipped.
// Farm-wide seasons and comparisons are pre-rendered by the worker (pyramid-render.ts) and read
// back here; the rest is drawn per request and kept in a bounded LRU keyed by farm, scope,
// dataset, threshold, tile and data version.
import { createHash } from 'node:crypto';
import { promisify } from 'node:util';
import { gzip as gzipCb } from 'node:zlib';
import type { GeoJSONVTFeature } from '@maplibre/geojson-vt';
import { fromGeojsonVt } from '@maplibre/vt-pbf';
import type { Actor } from '$lib/server/auth/guard';
import { bboxesIntersect, cellRangeInBbox, cellRingDrawer, gridWorldCorners, isTile, tileBbox, TILE_EXTENT } from '$lib/geo/tiles';
import { LruCache } from './cache';
import { blockAlign, cellRows, compareStatus, isHot, mapContext, sharePercent, type CellRegion, type CellRow, type CompareCellRow, type MapField } from './data';
import { datasetKey, type Dataset, type MapQuery } from './dataset';
import { storedTile } from './pyramid';

const gzip = promisify(gzipCb);

/** Below this zoom the map draws fields from GeoJSON and asks for no cells. */
export const CELLS_MIN_ZOOM = 11;
/** From this zoom each 10 m cell is its own square; below it, blocks of cells. */
export const CELLS_FULL_ZOOM = 15;
export const CELLS_MAX_ZOOM = 22;
/** Bump when drawCellsTile draws differently: stored pyramids of an older format are redrawn. */
export const TILE_FORMAT = 2;
/** Every span spanAt gives, smallest first. */
export const SPANS = [1, 2, 4, 8, 16];

export type TileFeature = GeoJSONVTFeature;

/** Encodes named layers of features as gzipped MVT 2, leaving out empty layers; null when all are empty. */
export async function encodeTile(layers: Record<string, TileFeature[]>, extent = TILE_EXTENT): Promise<Buffer | null> {
	const kept = Object.entries(layers).filter(([, features]) => features.length > 0);
	if (kept.length === 0) return null;
	const raw = fromGeojsonVt(Object.fromEntries(kept.map(([name, features]) => [name, { features }])), { version: 2, extent });
	return gzip(raw, { level: 6 });
}

export type EncodedTile = { body: Buffer | null; etag: string };

const cache = new LruCache<EncodedTile>(4000, 64 * 1024 * 1024, (t) => (t.body?.length ?? 0) + 200);

/** For tests and the bench: the cache's state. */
export function cacheStats() {
	return { entries: cache.size, bytes: cache.bytes };
}
export function clearTileCache() {
	cache.clear();
}

export function etagFor(key: string): string {
	return `"${createHash('sha1').update(key).digest('base64url')}"`;
}

const round1 = (v: number) => Math.round(v * 10) / 10;
const round3 = (v: number) => Math.round(v * 1000) / 1000;

/** The cells of some regions at full resolution (span 1) or as span x span blocks: `cellRows`, or rows fetched earlier. */
export type RowsFor = {
	(d: Dataset & { kind: 'season' | 'application' }, regions: CellRegion[], span: number): Promise<CellRow[]> | CellRow[];
	(d: Dataset & { kind: 'compare' }, regions: CellRegion[], span: number): Promise<CompareCellRow[]> | CompareCellRow[];
};

/**
 * The span of the squares drawn at zoom z: single cells from CELLS_FULL_ZOOM, and below it blocks
 * that double with each zoom out (2 x 2 at z14 up to 16 x 16 at z11), so a square stays about
 * three pixels wide or more: finer squares cost the browser (software WebGL above all) without
 * showing anything more.
 */
export function spanAt(z: number): number {
	return 2 ** Math.max(0, Math.min(4, CELLS_FULL_ZOOM - z));
}

/**
 * Draws tile z/x/y of the dataset over the given fields and encodes it (layer "cells"); null when
 * there is nothing to draw. The live route and the pre-rendered pyramid both draw through here,
 * so a stored tile is byte for byte the tile the route would have made. `corners` (per field)
 * lets many tiles share projected cell corners.
 */
export async function drawCellsTile(
	mapFields: MapField[],
	d: Dataset,
	threshold: number,
	z: number,
	x: number,
	y: number,
	rowsFor: RowsFor,
	corners?: Map<string, ReturnType<typeof gridWorldCorners>>
): Promise<Buffer | null> {
	if (z < CELLS_MIN_ZOOM) return null;
	const span = spanAt(z);
	const bbox = tileBbox(z, x, y);
	const regions: CellRegion[] = [];
	for (const f of mapFields) {
		if (!bboxesIntersect(f.bbox, bbox)) continue;
		const range = cellRangeInBbox(f.grid, bbox);
		if (range) regions.push({ fieldId: f.id, ...(span > 1 ? blockAlign(range, span) : range) });
	}
	if (regions.length === 0) return null;
	const drawers = new Map(mapFields.map((f) => [f.id, cellRingDrawer(f.grid, z, x, y, { corners: corners?.get(f.id) })]));
	const features: TileFeature[] = [];
	// In grid order, so that the same cells give the same bytes whichever way they were fetched.
	const inOrder = <T extends { fieldId: string; col: number; row: number }>(rows: T[]) =>
		rows.sort((a, b) => (a.fieldId < b.fieldId ? -1 : a.fieldId > b.fieldId ? 1 : a.row - b.row || a.col - b.col));
	if (d.kind === 'compare') {
		for (const c of inOrder(await rowsFor(d, regions, span))) {
			const ring = drawers.get(c.fieldId)!(c.col, c.row, span);
			if (!ring) continue;
			const shareE = sharePercent(c.earlier.coveredM2, c.earlier.sprayedM2);
			const shareL = sharePercent(c.later.coveredM2, c.later.sprayedM2);
			const both = c.earlier.coveredM2 > 0 && c.later.coveredM2 > 0;
			features.push({
				type: 3,
				geometry: [ring],
				tags: {
					field: c.fieldId,
					col: c.col,
					row: c.row,
					...(span > 1 ? { span } : {}),
					share: round1(shareL),
					change: both ? round1(shareL - shareE) : 0,
					status: compareStatus(isHot(c.earlier, threshold), isHot(c.later, threshold)),
					cover: round3(Math.min(c.earlier.cover, c.later.cover))
				}
			});
		}
	} else {
		for (const c of inOrder(await rowsFor(d, regions, span))) {
			const ring = drawers.get(c.fieldId)!(c.col, c.row, span);
			if (!ring) continue;
			features.push({
				type: 3,
				geometry: [ring],
				tags: {
					field: c.fieldId,
					col: c.col,
					row: c.row,
					...(span > 1 ? { span } : {}),
					share: round1(sharePercent(c.coveredM2, c.sprayedM2)),
					cover: round3(c.cover),
					hot: isHot(c, threshold) ? 1 : 0
				}
			});
		}
	}
	return encodeTile({ cells: features });
}

/**
 * The cells tile z/x/y of the dataset for this actor: gzipped MVT bytes (layer "cells") or null
 * when there is nothing to draw, and an ETag that changes with everything the bytes depend on.
 * Farm-wide season and comparison tiles at the saved threshold come from the pre-rendered
 * pyramid when it is current; everything else (a landlord's, a threshold preview, one
 * application, a pyramid still rendering) is drawn here and kept in the LRU.
 */
export async function cellsTile(actor: Actor, query: MapQuery, z: number, x: number, y: number): Promise<EncodedTile> {
	if (!isTile(z, x, y) || z > CELLS_MAX_ZOOM) throw new Error(`cellsTile: ${z}/${x}/${y} is not a tile this map serves`);
	if (actor.role !== 'landlord' && query.thresholdPercent === null && query.dataset.kind !== 'application') {
		const stored = await storedTile(actor.farm.id, query.dataset, z, x, y);
		if (stored) return stored;
	}
	const ctx = await mapContext(actor);
	const threshold = query.thresholdPercent ?? ctx.savedThresholdPercent;
	const key = [actor.farm.id, ctx.scopeKey, datasetKey(query.dataset), threshold, z, x, y, ctx.version].join('|');
	const hit = cache.get(key);
	if (hit) return hit;

	const d = query.dataset;
	const body = await drawCellsTile(ctx.fields, d, threshold, z, x, y, ((dd: Dataset, regions: CellRegion[], span: number) =>
		cellRows(actor, dd, regions, span)) as RowsFor);
	const tile = { body, etag: etagFor(key) };
	cache.set(key, tile);
	return tile;
}

/** Parses route parameters z, x and y (y may end in .pbf or .mvt); null when they name no tile. */
export function parseTileParams(p: { z?: string; x?: string; y?: string }): { z: number; x: number; y: number } | null {
	const m = /^(\d+)(?:\.(?:pbf|mvt))?$/.exec(p.y ?? '');
	if (!m || !/^\d+$/.test(p.z ?? '') || !/^\d+$/.test(p.x ?? '')) return null;
	const z = Number(p.z);
	const x = Number(p.x);
	const y = Number(m[1]);
	return isTile(z, x, y) ? { z, x, y } : null;
}

/** The HTTP answer for an encoded tile: 200 gzip, 304 when the client has it, 204 when empty. */
export function tileResponse(tile: EncodedTile, request: Request, cacheControl = 'private, no-cache'): Response {
	const headers = { 'cache-control': cacheControl, etag: tile.etag, vary: 'Cookie' };
	if (!tile.body) return new Response(null, { status: 204, headers: { 'cache-control': cacheControl } });
	const inm = request.headers.get('if-none-match');
	if (inm && inm.split(',').some((t) => t.trim().replace(/^W\//, '') === tile.etag)) {
		return new Response(null, { status: 304, headers });
	}
	return new Response(new Uint8Array(tile.body), {
		status: 200,
		headers: { ...headers, 'content-type': 'application/vnd.mapbox-vector-tile', 'content-encoding': 'gzip', 'content-length': String(tile.body.length) }
	});
}
