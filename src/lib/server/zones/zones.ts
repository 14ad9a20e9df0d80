// Zones of a field: read, create (drawn, imported or from hotspots, all-or-nothing), rename,
// describe, set a target rate, reshape and delete, each audited. Every function takes the Actor
// and scopes by farm and, for landlords, by granted fields; changes need the zones.edit ability.
import { and, eq, inArray, ne, sql } from 'drizzle-orm';
import type { Feature, FeatureCollection, MultiPolygon, Polygon } from 'geojson';
import { db } from '$lib/server/db';
import { fields, zones, type Zone } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import { record } from '$lib/server/audit';
import { visibleFieldIds } from '$lib/server/fields';
import { checkBoundary } from '$lib/geo/fields-boundary';
import { clipZone, type Neighbour, type ZoneGeometry } from '$lib/geo/zones';

export type { Zone };

export const ZONE_NAME_MAX = 120;
export const ZONE_DESCRIPTION_MAX = 2000;
/** Highest target rate accepted, L/m2 (1000 L/ha): far above any spray volume, catches typing slips. Common practice, no source. */
export const TARGET_RATE_MAX_L_PER_M2 = 0.1;

export type ZoneSource = 'drawn' | 'imported' | 'hotspots';

function fieldScope(actor: Actor) {
	return actor.role === 'landlord'
		? and(eq(fields.farmId, actor.farm.id), inArray(fields.id, visibleFieldIds(actor)))
		: eq(fields.farmId, actor.farm.id);
}

function zoneScope(actor: Actor) {
	return actor.role === 'landlord'
		? and(eq(zones.farmId, actor.farm.id), inArray(zones.fieldId, visibleFieldIds(actor)))
		: eq(zones.farmId, actor.farm.id);
}

function assertMayEdit(actor: Actor) {
	// Routes check this first; data functions check again so no caller can skip it.
	if (!may(actor.role, 'zones.edit')) throw new Error(`role ${actor.role} may not edit zones`);
}

const byName = (a: { name: string }, b: { name: string }) => a.name.localeCompare(b.name, 'en', { numeric: true, sensitivity: 'base' });

/** The zones of a field the actor may see, by name (numbers in names sort as numbers). */
export async function listZones(actor: Actor, fieldId: string): Promise<Zone[]> {
	const rows = await db.select().from(zones).where(and(zoneScope(actor), eq(zones.fieldId, fieldId)));
	return rows.sort(byName);
}

/** One zone the actor may see, or null. */
export async function getZone(actor: Actor, zoneId: string): Promise<Zone | null> {
	const [row] = await db.select().from(zones).where(and(zoneScope(actor), eq(zones.id, zoneId)));
	return row ?? null;
}

export type ZoneProps = { id: string; fieldId: string; name: string; areaM2: number; targetRateLPerM2: number | null };

/** Every visible zone of the farm as GeoJSON, for the farm map. */
export async function zoneFeatures(actor: Actor, fieldId?: string): Promise<FeatureCollection<Polygon | MultiPolygon, ZoneProps>> {
	const rows = await db
		.select({ id: zones.id, fieldId: zones.fieldId, name: zones.name, areaM2: zones.areaM2, targetRateLPerM2: zones.targetRateLPerM2, geometry: zones.geometry })
		.from(zones)
		.where(fieldId ? and(zoneScope(actor), eq(zones.fieldId, fieldId)) : zoneScope(actor));
	rows.sort(byName);
	return {
		type: 'FeatureCollection',
		features: rows.map(({ geometry, ...p }): Feature<Polygon | MultiPolygon, ZoneProps> => ({ type: 'Feature', id: p.id, properties: p, geometry }))
	};
}

/** Why a zone name cannot be used, or null. */
export function zoneNameProblem(name: string): string | null {
	if (name.length === 0) return 'Give the zone a name.';
	if (name.length > ZONE_NAME_MAX) return `Use at most ${ZONE_NAME_MAX} characters for a zone name (this one has ${name.length}).`;
	return null;
}

export function targetRateProblem(rate: number | null): string | null {
	if (rate === null) return null;
	if (!Number.isFinite(rate) || rate < 0) return 'The target rate must be a number, zero or more (zero: leave the zone unsprayed).';
	if (rate > TARGET_RATE_MAX_L_PER_M2) return 'The target rate is above 1000 L/ha (107 gal/ac); check the number and its unit.';
	return null;
}

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/** The field, locked: two requests cannot both add overlapping zones or the same name (NO KEY: uploads that insert rows referencing the field need not wait). */
async function lockField(tx: Tx, actor: Actor, fieldId: string) {
	const [field] = await tx
		.select({ id: fields.id, boundary: fields.boundary, name: fields.name, gridProj: fields.gridProj })
		.from(fields)
		.where(and(eq(fields.farmId, actor.farm.id), eq(fields.id, fieldId)))
		.for('no key update');
	return field ?? null;
}

async function neighbours(tx: Tx, fieldId: string, exceptId?: string): Promise<(Neighbour & { id: string })[]> {
	return tx
		.select({ id: zones.id, name: zones.name, geometry: zones.geometry })
		.from(zones)
		.where(exceptId ? and(eq(zones.fieldId, fieldId), ne(zones.id, exceptId)) : eq(zones.fieldId, fieldId));
}

export type NewZone = {
	name: string;
	description?: string;
	geometry: unknown;
	targetRateLPerM2?: number | null;
	/** Hotspot zones: the season they were made from. */
	season?: number | null;
};
export type ZoneProblem = { index: number; message: string };
export type SavedZone = { id: string; name: string; areaM2: number; outsideM2: number; overlaps: { name: string; areaM2: number }[] };

/**
 * Checks and cuts zones as they would be saved, in order: each one to the field and clear of the
 * field's zones and of the ones before it. No writes; the save below runs the same steps.
 */
function prepare(
	items: NewZone[],
	boundary: ZoneGeometry,
	proj: string,
	existing: Neighbour[],
	taken: Set<string>
): { rows: (NewZone & { name: string; geometry: ZoneGeometry; areaM2: number; outsideM2: number; overlaps: SavedZone['overlaps'] })[]; problems: ZoneProblem[] } {
	const problems: ZoneProblem[] = [];
	const rows: ReturnType<typeof prepare>['rows'] = [];
	const seen = new Map<string, number>();
	const placed: Neighbour[] = [...existing];
	items.forEach((item, index) => {
		const name = item.name.trim();
		const issue = zoneNameProblem(name);
		if (issue) problems.push({ index, message: issue });
		const key = name.toLocaleLowerCase();
		if (!issue && taken.has(key)) problems.push({ index, message: `A zone named “${name}” already exists in this field.` });
		else if (!issue && seen.has(key)) problems.push({ index, message: `“${name}” is also the name of zone ${seen.get(key)! + 1} in this list.` });
		seen.set(key, seen.get(key) ?? index);
		if ((item.description ?? '').length > ZONE_DESCRIPTION_MAX) problems.push({ index, message: `Use at most ${ZONE_DESCRIPTION_MAX} characters for the description.` });
		const rateIssue = targetRateProblem(item.targetRateLPerM2 ?? null);
		if (rateIssue) problems.push({ index, message: rateIssue });
		const checked = checkBoundary(item.geometry, { allowTouching: true });
		if ('error' in checked) {
			problems.push({ index, message: `The shape is not usable: ${checked.error}.` });
			return;
		}
		const clipped = clipZone(checked.boundary, boundary, placed, proj);
		if (!clipped.ok) {
			problems.push({ index, message: `Nothing is left of the shape: ${clipped.error}.` });
			return;
		}
		placed.push({ name: name || `zone ${index + 1}`, geometry: clipped.geometry });
		rows.push({ ...item, name, geometry: clipped.geometry, areaM2: clipped.areaM2, outsideM2: clipped.outsideM2, overlaps: clipped.overlaps });
	});
	return { rows, problems };
}

/**
 * Creates zones in a field, all or none: each is cut to the field and clear of the other zones
 * (the earlier one keeps shared ground). Problems name the item (index into `items`).
 */
export async function createZones(
	actor: Actor,
	fieldId: string,
	items: NewZone[],
	source: { via: ZoneSource; origin?: Record<string, unknown> }
): Promise<{ zones: SavedZone[] } | { problems: ZoneProblem[] } | null> {
	assertMayEdit(actor);
	if (items.length === 0) return { problems: [{ index: -1, message: 'There are no zones to save.' }] };
	type Outcome = { zones: SavedZone[] } | { problems: ZoneProblem[] } | null;
	const result = await db.transaction(async (tx): Promise<Outcome> => {
		const field = await lockField(tx, actor, fieldId);
		if (!field) return null;
		const existing = await neighbours(tx, fieldId);
		const taken = new Set(existing.map((z) => z.name.toLocaleLowerCase()));
		const { rows, problems } = prepare(items, field.boundary, field.gridProj, existing, taken);
		if (problems.length) return { problems };
		const inserted = await tx
			.insert(zones)
			.values(
				rows.map((r) => ({
					farmId: actor.farm.id,
					fieldId,
					name: r.name,
					description: (r.description ?? '').trim(),
					geometry: r.geometry,
					areaM2: r.areaM2,
					source: source.via,
					season: r.season ?? null,
					origin: source.origin ?? null,
					targetRateLPerM2: r.targetRateLPerM2 ?? null,
					createdBy: actor.user.id,
					updatedBy: actor.user.id
				}))
			)
			.returning({ id: zones.id, name: zones.name, areaM2: zones.areaM2 });
		return { zones: inserted.map((z, i) => ({ ...z, outsideM2: rows[i].outsideM2, overlaps: rows[i].overlaps })) };
	});
	if (!result || 'problems' in result) return result;
	for (const z of result.zones) {
		await record({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'zone.created',
			targetType: 'zone',
			targetId: z.id,
			detail: { fieldId, name: z.name, areaM2: z.areaM2, via: source.via, ...(source.origin ? { origin: source.origin } : {}), ...(z.outsideM2 || z.overlaps.length ? { cutM2: { outside: z.outsideM2, overlaps: z.overlaps } } : {}) }
		});
	}
	return result;
}

/** What saving these zones would do, without saving: for previews (cut areas, problems). */
export async function previewZones(actor: Actor, fieldId: string, items: NewZone[]) {
	const [field] = await db.select({ boundary: fields.boundary, gridProj: fields.gridProj }).from(fields).where(and(fieldScope(actor), eq(fields.id, fieldId)));
	if (!field) return null;
	const existing = await db.select({ name: zones.name, geometry: zones.geometry }).from(zones).where(eq(zones.fieldId, fieldId));
	return prepare(items, field.boundary, field.gridProj, existing, new Set(existing.map((z) => z.name.toLocaleLowerCase())));
}

export type ZoneChanges = { name?: string; description?: string; targetRateLPerM2?: number | null };

/** Renames, describes or sets the target rate of a zone; null when there is no such zone in the farm. */
export async function updateZone(actor: Actor, zoneId: string, changes: ZoneChanges): Promise<{ ok: true } | { error: string } | null> {
	assertMayEdit(actor);
	const name = changes.name?.trim();
	if (name !== undefined) {
		const issue = zoneNameProblem(name);
		if (issue) return { error: issue };
	}
	const description = changes.description?.trim();
	if (description !== undefined && description.length > ZONE_DESCRIPTION_MAX) return { error: `Use at most ${ZONE_DESCRIPTION_MAX} characters for the description.` };
	if (changes.targetRateLPerM2 !== undefined) {
		const issue = targetRateProblem(changes.targetRateLPerM2);
		if (issue) return { error: issue };
	}
	type Outcome = { error: string } | { before: Zone } | null;
	const result = await db.transaction(async (tx): Promise<Outcome> => {
		const [zone] = await tx.select().from(zones).where(and(eq(zones.farmId, actor.farm.id), eq(zones.id, zoneId)));
		if (!zone) return null;
		await lockField(tx, actor, zone.fieldId);
		if (name !== undefined && name.toLocaleLowerCase() !== zone.name.toLocaleLowerCase()) {
			const clash = (await neighbours(tx, zone.fieldId, zoneId)).some((z) => z.name.toLocaleLowerCase() === name.toLocaleLowerCase());
			if (clash) return { error: `A zone named “${name}” already exists in this field.` };
		}
		await tx
			.update(zones)
			.set({
				...(name !== undefined ? { name } : {}),
				...(description !== undefined ? { description } : {}),
				...(changes.targetRateLPerM2 !== undefined ? { targetRateLPerM2: changes.targetRateLPerM2 } : {}),
				updatedBy: actor.user.id,
				updatedAt: sql`now()`
			})
			.where(eq(zones.id, zoneId));
		return { before: zone };
	});
	if (!result || 'error' in result) return result;
	const b = result.before;
	const detail: Record<string, unknown> = {};
	if (name !== undefined && name !== b.name) detail.name = { from: b.name, to: name };
	if (description !== undefined && description !== b.description) detail.description = { from: b.description, to: description };
	if (changes.targetRateLPerM2 !== undefined && changes.targetRateLPerM2 !== b.targetRateLPerM2) detail.targetRateLPerM2 = { from: b.targetRateLPerM2, to: changes.targetRateLPerM2 };
	if (Object.keys(detail).length) await record({ farmId: actor.farm.id, actorId: actor.user.id, action: 'zone.edited', targetType: 'zone', targetId: zoneId, detail });
	return { ok: true };
}

/** A new shape for a zone, cut to the field and clear of the other zones; null when there is no such zone. */
export async function reshapeZone(
	actor: Actor,
	zoneId: string,
	geometry: unknown
): Promise<{ ok: true; zone: SavedZone } | { error: string } | null> {
	assertMayEdit(actor);
	const checked = checkBoundary(geometry, { allowTouching: true });
	if ('error' in checked) return { error: `The shape is not usable: ${checked.error}.` };
	type Outcome = { error: string } | { zone: SavedZone; before: number } | null;
	const result = await db.transaction(async (tx): Promise<Outcome> => {
		const [zone] = await tx.select().from(zones).where(and(eq(zones.farmId, actor.farm.id), eq(zones.id, zoneId)));
		if (!zone) return null;
		const field = await lockField(tx, actor, zone.fieldId);
		if (!field) return null;
		const clipped = clipZone(checked.boundary, field.boundary, await neighbours(tx, zone.fieldId, zoneId), field.gridProj);
		if (!clipped.ok) return { error: `Nothing is left of the shape: ${clipped.error}.` };
		await tx
			.update(zones)
			.set({ geometry: clipped.geometry, areaM2: clipped.areaM2, updatedBy: actor.user.id, updatedAt: sql`now()`, geometryUpdatedAt: sql`now()` })
			.where(eq(zones.id, zoneId));
		return { zone: { id: zoneId, name: zone.name, areaM2: clipped.areaM2, outsideM2: clipped.outsideM2, overlaps: clipped.overlaps }, before: zone.areaM2 };
	});
	if (!result || 'error' in result) return result;
	await record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'zone.reshaped',
		targetType: 'zone',
		targetId: zoneId,
		detail: { areaM2Before: result.before, areaM2After: result.zone.areaM2 }
	});
	return { ok: true, zone: result.zone };
}

/**
 * After a field's boundary changed: every zone cut to the new boundary, so zones stay inside the
 * field and the zone table still adds up. A zone left with nothing is removed. Runs inside the
 * boundary's own transaction; returns what changed for its audit entry.
 */
export async function fitZonesToBoundary(tx: Tx, fieldId: string, boundary: ZoneGeometry, proj: string) {
	const rows = await tx.select({ id: zones.id, name: zones.name, geometry: zones.geometry, areaM2: zones.areaM2 }).from(zones).where(eq(zones.fieldId, fieldId));
	const changed: { id: string; name: string; areaM2Before: number; areaM2After: number }[] = [];
	for (const z of rows) {
		const clipped = clipZone(z.geometry, boundary, [], proj);
		if (!clipped.ok) {
			await tx.delete(zones).where(eq(zones.id, z.id));
			changed.push({ id: z.id, name: z.name, areaM2Before: z.areaM2, areaM2After: 0 });
		} else if (clipped.outsideM2 >= 0.01) {
			await tx.update(zones).set({ geometry: clipped.geometry, areaM2: clipped.areaM2, updatedAt: sql`now()`, geometryUpdatedAt: sql`now()` }).where(eq(zones.id, z.id));
			changed.push({ id: z.id, name: z.name, areaM2Before: z.areaM2, areaM2After: clipped.areaM2 });
		}
	}
	return changed;
}

/** Deletes a zone (and its computed figures); false when there is no such zone in the farm. */
export async function removeZone(actor: Actor, zoneId: string): Promise<boolean> {
	assertMayEdit(actor);
	const [gone] = await db
		.delete(zones)
		.where(and(eq(zones.farmId, actor.farm.id), eq(zones.id, zoneId)))
		.returning({ name: zones.name, fieldId: zones.fieldId, areaM2: zones.areaM2, source: zones.source });
	if (!gone) return false;
	await record({ farmId: actor.farm.id, actorId: actor.user.id, action: 'zone.deleted', targetType: 'zone', targetId: zoneId, detail: gone });
	return true;
}
