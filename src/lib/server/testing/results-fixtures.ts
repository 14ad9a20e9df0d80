// Helpers for tests that need fields with results: a square field and an application with
// hand-written cells, inserted as rows (no log, no pipeline), so expected figures follow by hand.
import { db } from '$lib/server/db';
import { applications, cellResults, fields } from '$lib/server/db/schema';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import type { GridSpec } from '$lib/compute/types';

export type FieldRow = { id: string; grid: GridSpec };

export const square = (w: number, s: number, e: number, n: number) => ({ type: 'Polygon' as const, coordinates: [[[w, s], [e, s], [e, n], [w, n], [w, s]]] });

export async function addField(farmId: string, name: string, boundary: ReturnType<typeof square>): Promise<FieldRow> {
	const [f] = await db.insert(fields).values({ farmId, name, ...fieldGeometryColumns(boundary) }).returning();
	return { id: f.id, grid: { proj: f.gridProj, epsg: f.gridEpsg, cellSizeM: f.gridCellM, originX: f.gridOriginX, originY: f.gridOriginY, cols: f.gridCols, rows: f.gridRows } };
}

/** An application of the mix on the field on `day`; cells are [col, row, area, covered, sprayed] in m², volume 1 L per 100 m² sprayed. */
export async function addApplication(farmId: string, fieldId: string, mixId: string, day: string, cells: [number, number, number, number, number][]): Promise<string> {
	const [a] = await db
		.insert(applications)
		.values({
			farmId, fieldId, tankMixId: mixId, day, season: Number(day.slice(0, 4)),
			startedAt: new Date(`${day}T08:00:00Z`), endedAt: new Date(`${day}T09:00:00Z`), fixCount: 10,
			coveredM2: cells.reduce((s, c) => s + c[3], 0), sprayedM2: cells.reduce((s, c) => s + c[4], 0), volumeL: 1
		})
		.returning();
	await db.insert(cellResults).values(
		cells.map(([col, row, areaM2, coveredM2, sprayedM2]) => ({ applicationId: a.id, fieldId, col, row, areaM2, coveredM2, sprayedM2, volumeL: sprayedM2 * 1e-2 }))
	);
	return a.id;
}
