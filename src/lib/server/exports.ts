// Cells and hotspots for download, scoped like the map: a landlord's export holds granted fields
// only, and a field the actor may not see is no export at all. Figures at the farm's saved
// hotspot threshold, as the map shows them by default.
import type { Actor } from '$lib/server/auth/guard';
import { cellCornersLngLat } from '$lib/geo/tiles';
import { cellsCsv, cellsGeoJson, cellAttributes, type ExportCell } from '$lib/export/cells';
import { shapefileZip } from '$lib/export/shapefile';
import { cellRows, compareStatus, isHot, mapContext } from './map/data';
import type { Dataset } from './map/dataset';

export type ExportKind = 'cells' | 'hotspots';
export type ExportFormat = 'csv' | 'geojson' | 'shp';
export const exportFormats: ExportFormat[] = ['csv', 'geojson', 'shp'];

const statusNames = { 1: 'persistent', 2: 'new', 3: 'cleared' } as const;

/** The cells of the dataset (one field's, or every visible field's), or null when the field is not the actor's to see. */
export async function exportCells(actor: Actor, kind: ExportKind, d: Dataset & { kind: 'season' | 'compare' }, fieldId: string | null): Promise<ExportCell[] | null> {
	const ctx = await mapContext(actor);
	const chosen = fieldId ? ctx.fields.filter((f) => f.id === fieldId) : ctx.fields;
	if (fieldId && chosen.length === 0) return null;
	const byId = new Map(chosen.map((f) => [f.id, f]));
	const regions = chosen.map((f) => ({ fieldId: f.id, col0: 0, col1: f.grid.cols - 1, row0: 0, row1: f.grid.rows - 1 }));
	const threshold = ctx.savedThresholdPercent;
	const out: ExportCell[] = [];
	const push = (fieldId: string, col: number, row: number, areaM2: number, side: { coveredM2: number; sprayedM2: number; volumeL: number; cover: number }, hot: boolean, status?: ExportCell['status']) => {
		const f = byId.get(fieldId)!;
		out.push({ fieldName: f.name, fieldId, col, row, corners: cellCornersLngLat(f.grid, col, row), areaM2, ...side, hot, status });
	};
	if (d.kind === 'compare') {
		for (const c of await cellRows(actor, d, regions, 1)) {
			const status = compareStatus(isHot(c.earlier, threshold), isHot(c.later, threshold));
			if (kind === 'hotspots' && status === 0) continue;
			if (kind === 'cells' && c.later.coveredM2 === 0 && status === 0) continue;
			push(c.fieldId, c.col, c.row, c.areaM2, c.later, isHot(c.later, threshold), status === 0 ? undefined : statusNames[status]);
		}
	} else {
		for (const c of await cellRows(actor, d, regions, 1)) {
			const hot = isHot(c, threshold);
			if (kind === 'hotspots' && !hot) continue;
			if (c.coveredM2 === 0) continue;
			push(c.fieldId, c.col, c.row, c.areaM2, c, hot);
		}
	}
	out.sort((a, b) => a.fieldName.localeCompare(b.fieldName) || a.row - b.row || a.col - b.col);
	return out;
}

export type ExportFile = { body: Uint8Array | string; contentType: string; filename: string };

/** The cells in the chosen format, named after the farm, field, seasons and kind. */
export function exportFile(cells: ExportCell[], format: ExportFormat, base: string, d: Dataset & { kind: 'season' | 'compare' }): ExportFile {
	const seasons = d.kind === 'compare' ? `${d.earlier}-${d.later}` : String(d.season);
	const compared = d.kind === 'compare';
	if (format === 'csv') return { body: cellsCsv(cells, seasons, compared), contentType: 'text/csv; charset=utf-8; header=present', filename: `${base}.csv` };
	const fc = cellsGeoJson(cells, seasons, compared);
	if (format === 'geojson') return { body: JSON.stringify(fc), contentType: 'application/geo+json', filename: `${base}.geojson` };
	return { body: shapefileZip(base, fc, cellAttributes(seasons, compared)), contentType: 'application/zip', filename: `${base}-shapefile.zip` };
}
