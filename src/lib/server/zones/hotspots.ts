// Zones from hotspots: the hot cells of a field in a season, or those hot in both of two seasons
// (persistent), by the map's own definition (src/lib/server/map/data.ts: isHot, HOT_MIN_COVER and
// the farm's saved threshold), merged into zones by src/lib/geo/zones.ts.
import { and, desc, eq, inArray } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { applications, farms, zones } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import * as fieldData from '$lib/server/fields';
import { cellRows, compareStatus, isHot } from '$lib/server/map/data';
import type { GridSpec } from '$lib/compute/types';
import type { CellRef } from '$lib/geo/zone-cells';
import { hotspotZones, type HotspotZone } from '$lib/geo/zones';

export type HotspotMode = { kind: 'season'; season: number } | { kind: 'persistent'; earlier: number; later: number };

const gridOf = (f: fieldData.Field): GridSpec => ({
	proj: f.gridProj,
	epsg: f.gridEpsg,
	cellSizeM: f.gridCellM,
	originX: f.gridOriginX,
	originY: f.gridOriginY,
	cols: f.gridCols,
	rows: f.gridRows
});

/** Reads ?mode=season&season=2026 or ?mode=persistent&earlier=2025&later=2026. */
export function parseHotspotMode(params: URLSearchParams | FormData): HotspotMode | { error: string } {
	const get = (k: string) => String(params.get(k) ?? '').trim();
	const year = (k: string) => {
		const v = Number(get(k));
		return Number.isInteger(v) && v >= 1900 && v <= 2200 ? v : null;
	};
	if (get('mode') === 'persistent') {
		const earlier = year('earlier');
		const later = year('later');
		if (earlier === null || later === null) return { error: 'Choose the two seasons to compare.' };
		if (earlier >= later) return { error: 'The earlier season must come before the later one.' };
		return { kind: 'persistent', earlier, later };
	}
	const season = year('season');
	if (season === null) return { error: 'Choose a season.' };
	return { kind: 'season', season };
}

/** The hotspot cells of a field the actor may see (at the farm's saved threshold). */
export async function hotCells(actor: Actor, field: fieldData.Field, mode: HotspotMode, thresholdPercent: number): Promise<CellRef[]> {
	const region = [{ fieldId: field.id, col0: 0, col1: field.gridCols - 1, row0: 0, row1: field.gridRows - 1 }];
	if (mode.kind === 'season') {
		const rows = await cellRows(actor, { kind: 'season', season: mode.season }, region, 1);
		return rows.filter((r) => isHot(r, thresholdPercent)).map(({ col, row }) => ({ col, row }));
	}
	const rows = await cellRows(actor, { kind: 'compare', earlier: mode.earlier, later: mode.later }, region, 1);
	return rows
		.filter((r) => compareStatus(isHot(r.earlier, thresholdPercent), isHot(r.later, thresholdPercent)) === 1)
		.map(({ col, row }) => ({ col, row }));
}

export type HotspotPreview = {
	mode: HotspotMode;
	thresholdPercent: number;
	cellSizeM: number;
	hotCells: number;
	bufferM: number;
	minAreaM2: number;
	zones: (Omit<HotspotZone, 'cells'> & { name: string; cellCount: number })[];
	tooSmall: number;
	insideExisting: number;
};

/** The default name prefix of zones made this way: "Hot 2026", "Persistent 2025–26". */
export function defaultPrefix(mode: HotspotMode): string {
	return mode.kind === 'season' ? `Hot ${mode.season}` : `Persistent ${mode.earlier}–${String(mode.later).slice(-2)}`;
}

/**
 * The zones hotspot cells would make, named `prefix 1`, `prefix 2`, … (largest first, skipping
 * names the field already has); null when the field is not visible to the actor.
 */
export async function hotspotPreview(
	actor: Actor,
	fieldId: string,
	mode: HotspotMode,
	{ bufferM, minAreaM2, prefix }: { bufferM: number; minAreaM2: number; prefix?: string }
): Promise<HotspotPreview | null> {
	const field = await fieldData.get(actor, fieldId);
	if (!field) return null;
	const [[farm], existing] = await Promise.all([
		db.select({ threshold: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, actor.farm.id)),
		db.select({ name: zones.name, geometry: zones.geometry }).from(zones).where(and(eq(zones.farmId, actor.farm.id), eq(zones.fieldId, field.id)))
	]);
	const cells = await hotCells(actor, field, mode, farm.threshold);
	const made = hotspotZones({ cells, grid: gridOf(field), boundary: field.boundary, existing, bufferM, minAreaM2 });
	const taken = new Set(existing.map((z) => z.name.toLocaleLowerCase()));
	const base = (prefix ?? '').trim() || defaultPrefix(mode);
	let n = 0;
	const nextName = () => {
		let name: string;
		do name = `${base} ${++n}`;
		while (taken.has(name.toLocaleLowerCase()));
		return name;
	};
	return {
		mode,
		thresholdPercent: farm.threshold,
		cellSizeM: field.gridCellM,
		hotCells: cells.length,
		bufferM,
		minAreaM2,
		zones: made.zones.map(({ cells: zoneCells, ...z }) => ({ ...z, name: nextName(), cellCount: zoneCells.length })),
		tooSmall: made.tooSmall,
		insideExisting: made.insideExisting
	};
}

/** The seasons with applications in a field the actor may see, newest first. */
export async function fieldSeasons(actor: Actor, fieldId: string): Promise<number[]> {
	const conditions = [eq(applications.farmId, actor.farm.id), eq(applications.fieldId, fieldId)];
	if (actor.role === 'landlord') conditions.push(inArray(applications.fieldId, fieldData.visibleFieldIds(actor)));
	const rows = await db
		.selectDistinct({ season: applications.season })
		.from(applications)
		.where(and(...conditions))
		.orderBy(desc(applications.season));
	return rows.map((r) => r.season);
}
