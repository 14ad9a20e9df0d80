import { and, asc, count, eq, inArray, ne, sql } from 'drizzle-orm';
import type { MultiPolygon, Polygon } from 'geojson';
import { db } from '$lib/server/db';
import { applications, cellResults, farms, fields, landlordGrants, type Field } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import { record } from '$lib/server/audit';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { checkBoundary } from '$lib/geo/fields-boundary';
import { fitGrid } from '$lib/geo/fields-grid';
import { fitZonesToBoundary } from '$lib/server/zones/zones';

export type { Field };

export const NAME_MAX = 120;
export const CELL_SIZE_MIN_M = 1;
export const CELL_SIZE_MAX_M = 100;

/** The fields the actor may see: the farm's, or for a landlord only the granted ones. */
export function visibleFieldIds(actor: Actor) {
	return db
		.select({ id: landlordGrants.fieldId })
		.from(landlordGrants)
		.where(and(eq(landlordGrants.farmId, actor.farm.id), eq(landlordGrants.userId, actor.user.id)));
}

function scope(actor: Actor) {
	return actor.role === 'landlord'
		? and(eq(fields.farmId, actor.farm.id), inArray(fields.id, visibleFieldIds(actor)))
		: eq(fields.farmId, actor.farm.id);
}

/** The fields the actor may see, by name, with their area and cell size. */
export function list(actor: Actor) {
	return db
		.select({ id: fields.id, name: fields.name, areaM2: fields.areaM2, gridCellM: fields.gridCellM })
		.from(fields)
		.where(scope(actor))
		.orderBy(asc(fields.name));
}

/** Boundaries of the visible fields as a GeoJSON FeatureCollection (for maps). */
export async function featureCollection(actor: Actor) {
	const rows = await db
		.select({ id: fields.id, name: fields.name, areaM2: fields.areaM2, boundary: fields.boundary })
		.from(fields)
		.where(scope(actor))
		.orderBy(asc(fields.name));
	return {
		type: 'FeatureCollection' as const,
		features: rows.map((f) => ({
			type: 'Feature' as const,
			id: f.id,
			properties: { id: f.id, name: f.name, areaM2: f.areaM2 },
			geometry: f.boundary
		}))
	};
}

/** One field the actor may see, or null (another farm's field, or not granted, looks missing). */
export async function get(actor: Actor, id: string): Promise<Field | null> {
	const [row] = await db.select().from(fields).where(and(scope(actor), eq(fields.id, id)));
	return row ?? null;
}

/** How many applications a field holds: what deleting it would take with it. */
export async function applicationCount(actor: Actor, id: string): Promise<number> {
	const [row] = await db
		.select({ n: count() })
		.from(applications)
		.where(and(eq(applications.farmId, actor.farm.id), eq(applications.fieldId, id)));
	return row?.n ?? 0;
}

/** Why a field name cannot be used, or null. */
export function nameProblem(name: string): string | null {
	if (name.length === 0) return 'Give the field a name.';
	if (name.length > NAME_MAX) return `Use at most ${NAME_MAX} characters (this name has ${name.length}).`;
	return null;
}

function assertMayEdit(actor: Actor) {
	// Routes check this first; data functions check again so no caller can skip it.
	if (!may(actor.role, 'fields.edit')) throw new Error(`role ${actor.role} may not edit fields`);
}

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/** Field creation and renaming take this lock, so two requests cannot both add the same name. */
// NO KEY UPDATE: serialises field changes per farm without waiting on rows that merely refer to
// the farm (a worker writing the farm's map tiles holds KEY SHARE on it).
async function lockFarm(tx: Tx, farmId: string) {
	await tx.select({ id: farms.id }).from(farms).where(eq(farms.id, farmId)).for('no key update');
}

async function takenNames(tx: Tx, farmId: string, exceptId?: string): Promise<Set<string>> {
	const rows = await tx
		.select({ name: fields.name })
		.from(fields)
		.where(exceptId ? and(eq(fields.farmId, farmId), ne(fields.id, exceptId)) : eq(fields.farmId, farmId));
	return new Set(rows.map((r) => r.name.toLocaleLowerCase()));
}

export type NewField = { name: string; boundary: unknown; cellSizeM: number };
export type FieldProblem = { index: number; message: string };

/**
 * Creates the fields in one transaction: all of them, or none and a message per failing item
 * (index into `items`). Names are trimmed and must be unique in the farm, ignoring case.
 */
export async function createMany(
	actor: Actor,
	items: NewField[],
	source: { via: 'import' | 'draw'; file?: string }
): Promise<{ ids: string[] } | { problems: FieldProblem[] }> {
	assertMayEdit(actor);
	if (items.length === 0) return { problems: [{ index: -1, message: 'Tick at least one field to save.' }] };
	const problems: FieldProblem[] = [];
	const rows: (typeof fields.$inferInsert)[] = [];
	for (const [index, item] of items.entries()) {
		const name = item.name.trim();
		const nameIssue = nameProblem(name);
		if (nameIssue) problems.push({ index, message: nameIssue });
		if (!(item.cellSizeM >= CELL_SIZE_MIN_M && item.cellSizeM <= CELL_SIZE_MAX_M)) {
			problems.push({ index, message: `Cell size must be ${CELL_SIZE_MIN_M} to ${CELL_SIZE_MAX_M} m.` });
			continue;
		}
		const checked = checkBoundary(item.boundary);
		if ('error' in checked) {
			problems.push({ index, message: `Invalid boundary: ${checked.error}.` });
			continue;
		}
		rows.push({ farmId: actor.farm.id, name, ...fieldGeometryColumns(checked.boundary, item.cellSizeM) });
	}
	if (problems.length > 0) return { problems };

	type Outcome = { problems: FieldProblem[] } | { inserted: { id: string; name: string; areaM2: number }[] };
	const result = await db.transaction(async (tx): Promise<Outcome> => {
		await lockFarm(tx, actor.farm.id);
		const taken = await takenNames(tx, actor.farm.id);
		const seen = new Map<string, number>();
		const clashes: FieldProblem[] = [];
		for (const [index, row] of rows.entries()) {
			const key = row.name.toLocaleLowerCase();
			if (taken.has(key)) clashes.push({ index, message: `A field named “${row.name}” already exists in this farm.` });
			else if (seen.has(key)) clashes.push({ index, message: `“${row.name}” is also the name of item ${seen.get(key)! + 1}.` });
			seen.set(key, seen.get(key) ?? index);
		}
		if (clashes.length > 0) return { problems: clashes };
		const inserted = await tx.insert(fields).values(rows).returning({ id: fields.id, name: fields.name, areaM2: fields.areaM2 });
		return { inserted };
	});
	if ('problems' in result) return result;
	for (const f of result.inserted) {
		await record({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'field.created',
			targetType: 'field',
			targetId: f.id,
			detail: { name: f.name, areaM2: f.areaM2, via: source.via, ...(source.file ? { file: source.file } : {}) }
		});
	}
	return { ids: result.inserted.map((f) => f.id) };
}

/** Renames a field the actor may edit; null when there is no such field in the farm. */
export async function rename(actor: Actor, id: string, newName: string): Promise<{ ok: true } | { error: string } | null> {
	assertMayEdit(actor);
	const name = newName.trim();
	const issue = nameProblem(name);
	if (issue) return { error: issue };
	const result = await db.transaction(async (tx): Promise<{ error: string } | { from: string } | null> => {
		await lockFarm(tx, actor.farm.id);
		const [field] = await tx.select({ name: fields.name }).from(fields).where(and(eq(fields.farmId, actor.farm.id), eq(fields.id, id)));
		if (!field) return null;
		if ((await takenNames(tx, actor.farm.id, id)).has(name.toLocaleLowerCase())) {
			return { error: `A field named “${name}” already exists in this farm.` };
		}
		await tx.update(fields).set({ name, updatedAt: sql`now()` }).where(eq(fields.id, id));
		return { from: field.name };
	});
	if (!result || 'error' in result) return result;
	if (result.from !== name) {
		await record({ farmId: actor.farm.id, actorId: actor.user.id, action: 'field.renamed', targetType: 'field', targetId: id, detail: { from: result.from, to: name } });
	}
	return { ok: true };
}

/**
 * Replaces a field's boundary. The area is recomputed; the grid keeps its projection, cell size
 * and alignment and grows to cover the new boundary. If the boundary reaches past the grid's
 * south-west corner the origin moves out by whole cells, which is refused once cells have been
 * computed for the field (their numbers would change under them).
 */
export async function updateBoundary(
	actor: Actor,
	id: string,
	boundary: unknown
): Promise<{ ok: true; areaM2: number } | { error: string } | null> {
	assertMayEdit(actor);
	const checked = checkBoundary(boundary);
	if ('error' in checked) return { error: `Invalid boundary: ${checked.error}.` };
	type Outcome = { error: string } | { before: number; shift: number[]; zonesCut: Awaited<ReturnType<typeof fitZonesToBoundary>> } | null;
	const result = await db.transaction(async (tx): Promise<Outcome> => {
		const [field] = await tx
			.select()
			.from(fields)
			.where(and(eq(fields.farmId, actor.farm.id), eq(fields.id, id)))
			.for('update');
		if (!field) return null;
		const fitted = fitGrid(
			{
				proj: field.gridProj,
				epsg: field.gridEpsg,
				cellSizeM: field.gridCellM,
				originX: field.gridOriginX,
				originY: field.gridOriginY,
				cols: field.gridCols,
				rows: field.gridRows
			},
			checked.boundary as Polygon | MultiPolygon
		);
		if (fitted.shiftCols > 0 || fitted.shiftRows > 0) {
			const [computed] = await tx.select({ n: count() }).from(cellResults).where(eq(cellResults.fieldId, id));
			if ((computed?.n ?? 0) > 0) {
				return {
					error:
						'The new boundary reaches south or west of the field’s grid, and cells have already been computed on that grid. Keep the boundary inside the grid, or make a new field.'
				};
			}
		}
		await tx
			.update(fields)
			.set({
				boundary: checked.boundary,
				areaM2: checked.areaM2,
				gridOriginX: fitted.grid.originX,
				gridOriginY: fitted.grid.originY,
				gridCols: fitted.grid.cols,
				gridRows: fitted.grid.rows,
				updatedAt: sql`now()`
			})
			.where(eq(fields.id, id));
		// Zones stay inside their field, so the zone table still adds up to it.
		const zonesCut = await fitZonesToBoundary(tx, id, checked.boundary as Polygon | MultiPolygon, field.gridProj);
		return { before: field.areaM2, shift: [fitted.shiftCols, fitted.shiftRows], zonesCut };
	});
	if (!result || 'error' in result) return result;
	await record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'field.boundary_edited',
		targetType: 'field',
		targetId: id,
		detail: { areaM2Before: result.before, areaM2After: checked.areaM2, gridShiftColsRows: result.shift, ...(result.zonesCut.length ? { zonesCut: result.zonesCut } : {}) }
	});
	return { ok: true, areaM2: checked.areaM2 };
}

/** Deletes a field and, by cascade, its applications and cells. False when there is no such field. */
export async function remove(actor: Actor, id: string): Promise<boolean> {
	assertMayEdit(actor);
	const [gone] = await db
		.delete(fields)
		.where(and(eq(fields.farmId, actor.farm.id), eq(fields.id, id)))
		.returning({ name: fields.name, areaM2: fields.areaM2 });
	if (!gone) return false;
	await record({ farmId: actor.farm.id, actorId: actor.user.id, action: 'field.deleted', targetType: 'field', targetId: id, detail: gone });
	return true;
}
