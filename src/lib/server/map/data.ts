// The weed-pressure map's data: the season's (or one application's, or two seasons') cells of the
// fields the actor may see, aggregated in PostgreSQL, plus the map's meta, summary and one cell's
// history. Every query is scoped by farm and, for a landlord, by granted fields: a tile or summary
// is built only from the fields `mapFields` returns.
import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { MultiPolygon, Polygon } from 'geojson';
import { db } from '$lib/server/db';
import { applications, farms, fields, tankMixes } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import { visibleFieldIds } from '$lib/server/fields';
import type { GridSpec } from '$lib/compute/types';
import { areaM2 as ellipsoidalAreaM2 } from '$lib/geo/area';
import { cellCornersLngLat, gridBbox, type Bbox, type CellRange } from '$lib/geo/tiles';
import type { Dataset, MapQuery } from './dataset';

/** A cell is hot only when at least this share of it was driven over (contract, issue 5). */
export const HOT_MIN_COVER = 0.5;

export type MapField = { id: string; name: string; grid: GridSpec; bbox: Bbox };

/** What a tile or summary of this actor depends on: fields (with grids), saved threshold, data version. */
export type MapContext = {
	fields: MapField[];
	savedThresholdPercent: number;
	/** Changes whenever results are recomputed or removed, the threshold is saved or a field's grid changes. */
	version: string;
	/** The same for every actor who sees the same fields: 'all' or a landlord's granted field ids. */
	scopeKey: string;
};

function fieldScope(actor: Actor) {
	return actor.role === 'landlord'
		? and(eq(fields.farmId, actor.farm.id), inArray(fields.id, visibleFieldIds(actor)))
		: eq(fields.farmId, actor.farm.id);
}

function applicationScope(actor: Actor) {
	return actor.role === 'landlord'
		? and(eq(applications.farmId, actor.farm.id), inArray(applications.fieldId, visibleFieldIds(actor)))
		: eq(applications.farmId, actor.farm.id);
}

// Grid bounds cost a few hundred projections per farm; they change only with the grid.
const bboxMemo = new Map<string, Bbox>();
function memoGridBbox(key: string, grid: GridSpec): Bbox {
	let b = bboxMemo.get(key);
	if (!b) {
		if (bboxMemo.size > 10_000) bboxMemo.clear();
		b = gridBbox(grid);
		bboxMemo.set(key, b);
	}
	return b;
}

/** One query: the visible fields' grids and what the farm's map data version depends on. */
export async function mapContext(actor: Actor): Promise<MapContext> {
	const granted =
		actor.role === 'landlord'
			? sql`and f.id in (select field_id from landlord_grants where farm_id = ${actor.farm.id} and user_id = ${actor.user.id})`
			: sql``;
	type Raw = {
		threshold: number; version: string;
		id: string | null; name: string; updated: string; proj: string; epsg: number | null; cell: number; ox: number; oy: number; cols: number; rows: number;
	};
	const rows = await db.execute<Raw>(sql`
		select fa.hotspot_threshold_percent as threshold,
			coalesce((select max(computed_at)::text from applications where farm_id = fa.id), '-') || '/' ||
				(select count(*) from applications where farm_id = fa.id) || '/' ||
				coalesce((max(f.updated_at) over ())::text, '') || '/' || (count(f.id) over ()) || '/' ||
				fa.hotspot_threshold_percent::text as version,
			f.id, f.name, f.updated_at::text as updated, f.grid_proj as proj, f.grid_epsg as epsg, f.grid_cell_m as cell,
			f.grid_origin_x as ox, f.grid_origin_y as oy, f.grid_cols as cols, f.grid_rows as rows
		from farms fa left join fields f on f.farm_id = fa.id ${granted}
		where fa.id = ${actor.farm.id}
		order by f.id`);
	const v = rows[0];
	const mapFields: MapField[] = [];
	for (const r of rows) {
		if (!r.id) continue;
		const grid: GridSpec = { proj: r.proj, epsg: r.epsg, cellSizeM: r.cell, originX: r.ox, originY: r.oy, cols: r.cols, rows: r.rows };
		mapFields.push({ id: r.id, name: r.name, grid, bbox: memoGridBbox(`${r.id}|${r.updated}`, grid) });
	}
	return {
		fields: mapFields,
		savedThresholdPercent: v?.threshold ?? 20,
		version: v?.version ?? '-',
		scopeKey: actor.role === 'landlord' ? mapFields.map((f) => f.id).join(',') : 'all'
	};
}

export type CellRegion = { fieldId: string } & CellRange;

function datasetCondition(actor: Actor, d: Dataset): SQL {
	const farm = sql`a.farm_id = ${actor.farm.id}`;
	if (d.kind === 'season') return sql`${farm} and a.season = ${d.season}`;
	if (d.kind === 'application') return sql`${farm} and a.id = ${d.applicationId}`;
	return sql`${farm} and a.season in (${d.earlier}, ${d.later})`;
}

/**
 * One row per cell with results in the regions: covered and sprayed areas summed over the
 * applications (so share is covered-area-weighted), cover the largest single application's
 * covered fraction. Compare mode has both seasons' columns; `e`/`l` mark earlier and later.
 */
function cellsSql(actor: Actor, d: Dataset, regions: CellRegion[]): SQL {
	const values = sql.join(
		regions.map((r) => sql`(${r.fieldId}::uuid, ${r.col0}::int, ${r.col1}::int, ${r.row0}::int, ${r.row1}::int)`),
		sql`, `
	);
	const from = sql`from (values ${values}) as t(field_id, c0, c1, r0, r1)
		join applications a on a.field_id = t.field_id
		join cell_results r on r.application_id = a.id and r.col between t.c0 and t.c1 and r.row between t.r0 and t.r1
		where ${datasetCondition(actor, d)}
		group by r.field_id, r.col, r.row`;
	const cover = sql`least(r.covered_m_2 / nullif(r.area_m_2, 0), 1)`;
	if (d.kind !== 'compare') {
		return sql`select r.field_id, r.col, r.row, max(r.area_m_2) as area, sum(r.covered_m_2) as cov, sum(r.sprayed_m_2) as spr,
			sum(r.volume_l) as vol, coalesce(max(${cover}), 0) as cover, count(*)::int as apps ${from}`;
	}
	const e = sql`a.season = ${d.earlier}`;
	const l = sql`a.season = ${d.later}`;
	return sql`select r.field_id, r.col, r.row, max(r.area_m_2) as area,
		coalesce(sum(r.covered_m_2) filter (where ${e}), 0) as cov_e, coalesce(sum(r.sprayed_m_2) filter (where ${e}), 0) as spr_e,
		coalesce(max(${cover}) filter (where ${e}), 0) as cover_e, coalesce(sum(r.volume_l) filter (where ${e}), 0) as vol_e,
		coalesce(sum(r.covered_m_2) filter (where ${l}), 0) as cov_l, coalesce(sum(r.sprayed_m_2) filter (where ${l}), 0) as spr_l,
		coalesce(max(${cover}) filter (where ${l}), 0) as cover_l, coalesce(sum(r.volume_l) filter (where ${l}), 0) as vol_l ${from}`;
}

export type CellRow = { fieldId: string; col: number; row: number; areaM2: number; coveredM2: number; sprayedM2: number; volumeL: number; cover: number };
type Side = { coveredM2: number; sprayedM2: number; volumeL: number; cover: number };
export type CompareCellRow = { fieldId: string; col: number; row: number; areaM2: number; earlier: Side; later: Side };

type RawCell = { field_id: string; col: number; row: number; area: number; cov: number; spr: number; vol: number; cover: number };
type RawCompare = {
	field_id: string; col: number; row: number; area: number;
	cov_e: number; spr_e: number; vol_e: number; cover_e: number; cov_l: number; spr_l: number; vol_l: number; cover_l: number;
};

/**
 * The dataset's cells in the regions, at full resolution (span 1) or as span x span blocks keyed
 * by their lower-left cell. A block sums its cells' areas; its cover is the area-weighted mean of
 * its cells' covers, its share sprayed over covered. Regions must be whole blocks (see blockAlign).
 */
export async function cellRows(actor: Actor, d: Dataset & { kind: 'season' | 'application' }, regions: CellRegion[], span: number): Promise<CellRow[]>;
export async function cellRows(actor: Actor, d: Dataset & { kind: 'compare' }, regions: CellRegion[], span: number): Promise<CompareCellRow[]>;
export async function cellRows(actor: Actor, d: Dataset, regions: CellRegion[], span: number): Promise<CellRow[] | CompareCellRow[]>;
export async function cellRows(actor: Actor, d: Dataset, regions: CellRegion[], span: number): Promise<CellRow[] | CompareCellRow[]> {
	if (regions.length === 0) return [];
	if (!Number.isInteger(span) || span < 1) throw new Error(`cellRows: span must be a positive integer, got ${span}`);
	const cells = cellsSql(actor, d, regions);
	const s = span;
	if (d.kind !== 'compare') {
		const query =
			s === 1
				? cells
				: sql`select field_id, (col / ${s}::int) * ${s}::int as col, (row / ${s}::int) * ${s}::int as row, sum(area) as area,
					sum(cov) as cov, sum(spr) as spr, sum(vol) as vol, sum(area * cover) / nullif(sum(area), 0) as cover
					from (${cells}) c group by 1, 2, 3`;
		const rows = await db.execute<RawCell>(query);
		return rows.map((r) => ({ fieldId: r.field_id, col: r.col, row: r.row, areaM2: r.area, coveredM2: r.cov, sprayedM2: r.spr, volumeL: r.vol, cover: r.cover ?? 0 }));
	}
	const query =
		s === 1
			? cells
			: sql`select field_id, (col / ${s}::int) * ${s}::int as col, (row / ${s}::int) * ${s}::int as row, sum(area) as area,
				sum(cov_e) as cov_e, sum(spr_e) as spr_e, sum(vol_e) as vol_e, sum(area * cover_e) / nullif(sum(area), 0) as cover_e,
				sum(cov_l) as cov_l, sum(spr_l) as spr_l, sum(vol_l) as vol_l, sum(area * cover_l) / nullif(sum(area), 0) as cover_l
				from (${cells}) c group by 1, 2, 3`;
	const rows = await db.execute<RawCompare>(query);
	return rows.map((r) => ({
		fieldId: r.field_id,
		col: r.col,
		row: r.row,
		areaM2: r.area,
		earlier: { coveredM2: r.cov_e, sprayedM2: r.spr_e, volumeL: r.vol_e, cover: r.cover_e ?? 0 },
		later: { coveredM2: r.cov_l, sprayedM2: r.spr_l, volumeL: r.vol_l, cover: r.cover_l ?? 0 }
	}));
}

/** Widens a cell range to whole span x span blocks, so no block is cut at a tile's edge. */
export function blockAlign(range: CellRange, span: number): CellRange {
	return {
		col0: Math.floor(range.col0 / span) * span,
		col1: Math.floor(range.col1 / span) * span + span - 1,
		row0: Math.floor(range.row0 / span) * span,
		row1: Math.floor(range.row1 / span) * span + span - 1
	};
}

/** Treated share in percent: sprayed over covered area; 0 where nothing was covered. */
export function sharePercent(coveredM2: number, sprayedM2: number): number {
	return coveredM2 > 0 ? (100 * sprayedM2) / coveredM2 : 0;
}

export function isHot(side: { coveredM2: number; sprayedM2: number; cover: number }, thresholdPercent: number): boolean {
	return side.coveredM2 > 0 && side.cover >= HOT_MIN_COVER && sharePercent(side.coveredM2, side.sprayedM2) >= thresholdPercent;
}

/** Compare status: 0 neither hot, 1 persistent, 2 new, 3 cleared. */
export function compareStatus(hotEarlier: boolean, hotLater: boolean): 0 | 1 | 2 | 3 {
	return hotEarlier ? (hotLater ? 1 : 3) : hotLater ? 2 : 0;
}

// ---------------------------------------------------------------- meta

export type MapMeta = {
	seasons: number[];
	applications: { id: string; fieldId: string; fieldName: string; day: string; season: number; tankMixName: string }[];
	thresholdPercent: number;
	canSetThreshold: boolean;
	bounds: Bbox | null;
};

function boundaryBbox(geometry: Polygon | MultiPolygon, into: Bbox) {
	const polygons = geometry.type === 'Polygon' ? [geometry.coordinates] : geometry.coordinates;
	for (const rings of polygons) {
		for (const [lng, lat] of rings[0] ?? []) {
			into[0] = Math.min(into[0], lng); into[1] = Math.min(into[1], lat);
			into[2] = Math.max(into[2], lng); into[3] = Math.max(into[3], lat);
		}
	}
}

export async function meta(actor: Actor): Promise<MapMeta> {
	const [apps, boundaries, [farm]] = await Promise.all([
		db
			.select({
				id: applications.id,
				fieldId: applications.fieldId,
				fieldName: fields.name,
				day: applications.day,
				season: applications.season,
				tankMixName: tankMixes.name
			})
			.from(applications)
			.innerJoin(fields, eq(fields.id, applications.fieldId))
			.innerJoin(tankMixes, eq(tankMixes.id, applications.tankMixId))
			.where(applicationScope(actor))
			.orderBy(desc(applications.day), asc(fields.name)),
		db.select({ boundary: fields.boundary }).from(fields).where(fieldScope(actor)),
		db.select({ threshold: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, actor.farm.id))
	]);
	const bounds: Bbox = [Infinity, Infinity, -Infinity, -Infinity];
	for (const b of boundaries) boundaryBbox(b.boundary, bounds);
	return {
		seasons: [...new Set(apps.map((a) => a.season))].sort((a, b) => b - a),
		applications: apps,
		thresholdPercent: farm.threshold,
		canSetThreshold: may(actor.role, 'hotspots.set'),
		bounds: Number.isFinite(bounds[0]) ? bounds : null
	};
}

// ---------------------------------------------------------------- summary

export type FieldSummary = { fieldId: string; name: string; areaM2: number; coveredM2: number; sprayedM2: number; sharePercent: number; hotspots: number };
export type MapSummary = {
	cells: number;
	hotspots: number;
	hotspotAreaM2: number;
	perField: FieldSummary[];
	compare?: {
		earlier: number;
		later: number;
		persistent: number;
		new: number;
		cleared: number;
		persistentAreaM2: number;
		newAreaM2: number;
		clearedAreaM2: number;
	};
};

/**
 * Counts over full-resolution cells of every visible field (or of `fieldIds` among them). In compare mode the cell, hotspot and
 * per-field figures are the later season's. Covered and sprayed areas sum the applications, as
 * the share does. Only fields with cells in the dataset are listed, by name.
 */
export async function summary(actor: Actor, query: MapQuery, options: { fieldIds?: string[] } = {}): Promise<MapSummary> {
	const ctx = await mapContext(actor);
	const t = query.thresholdPercent ?? ctx.savedThresholdPercent;
	const d = query.dataset;
	// One field's page asks for its own figures only (the year-over-year chart).
	const shown = options.fieldIds ? ctx.fields.filter((f) => options.fieldIds!.includes(f.id)) : ctx.fields;
	const regions = shown.map((f) => ({ fieldId: f.id, col0: 0, col1: f.grid.cols - 1, row0: 0, row1: f.grid.rows - 1 }));
	const empty: MapSummary = { cells: 0, hotspots: 0, hotspotAreaM2: 0, perField: [] };
	if (d.kind === 'compare') empty.compare = { earlier: d.earlier, later: d.later, persistent: 0, new: 0, cleared: 0, persistentAreaM2: 0, newAreaM2: 0, clearedAreaM2: 0 };
	if (regions.length === 0) return empty;
	const cells = cellsSql(actor, d, regions);
	const hotL =
		d.kind === 'compare'
			? sql`(cov_l > 0 and cover_l >= ${HOT_MIN_COVER} and 100 * spr_l / cov_l >= ${t})`
			: sql`(cov > 0 and cover >= ${HOT_MIN_COVER} and 100 * spr / cov >= ${t})`;
	const hotE = sql`(cov_e > 0 and cover_e >= ${HOT_MIN_COVER} and 100 * spr_e / cov_e >= ${t})`;
	const cov = d.kind === 'compare' ? sql`cov_l` : sql`cov`;
	const spr = d.kind === 'compare' ? sql`spr_l` : sql`spr`;
	const compareCols =
		d.kind === 'compare'
			? sql`, count(*) filter (where ${hotE} and ${hotL})::int as persistent, count(*) filter (where ${hotL} and not ${hotE})::int as new_n,
				count(*) filter (where ${hotE} and not ${hotL})::int as cleared,
				coalesce(sum(area) filter (where ${hotE} and ${hotL}), 0) as persistent_area, coalesce(sum(area) filter (where ${hotL} and not ${hotE}), 0) as new_area,
				coalesce(sum(area) filter (where ${hotE} and not ${hotL}), 0) as cleared_area`
			: sql``;
	type Raw = {
		field_id: string; cells: number; hotspots: number; hot_area: number; cov: number; spr: number;
		persistent?: number; new_n?: number; cleared?: number; persistent_area?: number; new_area?: number; cleared_area?: number;
	};
	const rows = await db.execute<Raw>(sql`
		select field_id, count(*) filter (where ${cov} > 0)::int as cells, count(*) filter (where ${hotL})::int as hotspots,
			coalesce(sum(area) filter (where ${hotL}), 0) as hot_area, sum(${cov}) as cov, sum(${spr}) as spr ${compareCols}
		from (${cells}) c group by field_id`);
	const byId = new Map(ctx.fields.map((f) => [f.id, f]));
	const areas = new Map(
		(await db.select({ id: fields.id, areaM2: fields.areaM2 }).from(fields).where(fieldScope(actor))).map((f) => [f.id, f.areaM2])
	);
	const out = empty;
	for (const r of rows) {
		if (r.cells === 0 && !(r.cleared ?? 0)) continue;
		out.cells += r.cells;
		out.hotspots += r.hotspots;
		out.hotspotAreaM2 += r.hot_area;
		if (r.cells > 0) {
			out.perField.push({
				fieldId: r.field_id,
				name: byId.get(r.field_id)?.name ?? '',
				areaM2: areas.get(r.field_id) ?? 0,
				coveredM2: r.cov,
				sprayedM2: r.spr,
				sharePercent: sharePercent(r.cov, r.spr),
				hotspots: r.hotspots
			});
		}
		if (out.compare) {
			out.compare.persistent += r.persistent ?? 0;
			out.compare.new += r.new_n ?? 0;
			out.compare.cleared += r.cleared ?? 0;
			out.compare.persistentAreaM2 += r.persistent_area ?? 0;
			out.compare.newAreaM2 += r.new_area ?? 0;
			out.compare.clearedAreaM2 += r.cleared_area ?? 0;
		}
	}
	out.perField.sort((a, b) => a.name.localeCompare(b.name));
	return out;
}

// ---------------------------------------------------------------- one cell

export type CellHistory = {
	fieldId: string;
	fieldName: string;
	col: number;
	row: number;
	areaM2: number;
	history: { season: number; applications: number; coveredM2: number; sprayedM2: number; sharePercent: number; volumeL: number }[];
};

/** A visible field's cell across every season, newest first; null when the field is not visible or the cell is off its grid. */
export async function cellHistory(actor: Actor, fieldId: string, col: number, row: number): Promise<CellHistory | null> {
	const [field] = await db
		.select({
			id: fields.id, name: fields.name, proj: fields.gridProj, epsg: fields.gridEpsg, cellSizeM: fields.gridCellM,
			originX: fields.gridOriginX, originY: fields.gridOriginY, cols: fields.gridCols, rows: fields.gridRows
		})
		.from(fields)
		.where(and(fieldScope(actor), eq(fields.id, fieldId)));
	if (!field) return null;
	if (!Number.isInteger(col) || !Number.isInteger(row) || col < 0 || row < 0 || col >= field.cols || row >= field.rows) return null;
	const rows = await db.execute<{ season: number; apps: number; cov: number; spr: number; vol: number; area: number }>(sql`
		select a.season, count(*)::int as apps, sum(r.covered_m_2) as cov, sum(r.sprayed_m_2) as spr, sum(r.volume_l) as vol, max(r.area_m_2) as area
		from applications a join cell_results r on r.application_id = a.id and r.col = ${col} and r.row = ${row}
		where a.farm_id = ${actor.farm.id} and a.field_id = ${fieldId}
		group by a.season order by a.season desc`);
	// A cell never driven over has no stored area; the whole square's ellipsoidal area stands in.
	const areaM2 =
		rows.length > 0
			? Math.max(...rows.map((r) => r.area))
			: ellipsoidalAreaM2({ type: 'Polygon', coordinates: [[...cellCornersLngLat(field, col, row), cellCornersLngLat(field, col, row)[0]]] });
	return {
		fieldId: field.id,
		fieldName: field.name,
		col,
		row,
		areaM2,
		history: rows.map((r) => ({
			season: r.season,
			applications: r.apps,
			coveredM2: r.cov,
			sprayedM2: r.spr,
			sharePercent: sharePercent(r.cov, r.spr),
			volumeL: r.vol
		}))
	};
}
