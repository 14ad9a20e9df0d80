import { and, eq } from 'drizzle-orm';
import type { Polygon } from 'geojson';
import proj4 from 'proj4';
import { expect, test } from 'vitest';
import { db } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { requireRole, type Actor } from '$lib/server/auth/guard';
import { eventFor, grant, join, makeFarm, makeField, makeUser } from '$lib/server/testing/fixtures';
import * as fields from './fields';
import { list } from './fields';

test('a landlord lists only granted fields; a manager lists all the farm’s and none of another farm’s', async () => {
	const farm = await makeFarm();
	const other = await makeFarm();
	const manager = await makeUser();
	const landlord = await makeUser();
	await join(farm.id, manager.id, 'manager');
	await join(farm.id, landlord.id, 'landlord');
	const a = await makeField(farm.id, 'A');
	await makeField(farm.id, 'B');
	await makeField(other.id, 'Elsewhere');
	await grant(farm.id, landlord.id, a.id);

	const farmRef = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	expect((await list({ user: manager, farm: farmRef, role: 'manager' })).map((f) => f.name)).toEqual(['A', 'B']);
	expect((await list({ user: landlord, farm: farmRef, role: 'landlord' })).map((f) => f.name)).toEqual(['A']);
});

// Boundaries from chosen UTM 11N coordinates (proj4 inverse), so grid numbers follow from the
// construction. Corners sit 0.5 m inside whole 10 m cells.
const inverse = proj4('+proj=utm +zone=11 +datum=WGS84 +units=m +no_defs', 'EPSG:4326').forward;
function rectangleUtm(x0: number, y0: number, x1: number, y1: number): Polygon {
	return { type: 'Polygon', coordinates: [[[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]].map((p) => inverse(p))] };
}
const withHole: Polygon = {
	type: 'Polygon',
	coordinates: [rectangleUtm(400_000.5, 5_220_000.5, 400_399.5, 5_220_299.5).coordinates[0], rectangleUtm(400_100, 5_220_100, 400_150, 5_220_150).coordinates[0].reverse()]
};

async function managerOfNewFarm(): Promise<Actor> {
	const farm = await makeFarm();
	const user = await makeUser();
	await join(farm.id, user.id, 'manager');
	return { user, farm: { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency }, role: 'manager' };
}

async function auditOf(farmId: string) {
	return db.select().from(auditLog).where(eq(auditLog.farmId, farmId)).orderBy(auditLog.at);
}

test('createMany saves all the fields with area and grid, and audits each', async () => {
	const actor = await managerOfNewFarm();
	const result = await fields.createMany(
		actor,
		[
			{ name: ' Home Paddock ', boundary: withHole, cellSizeM: 10 },
			{ name: 'Back Forty', boundary: rectangleUtm(401_000.5, 5_220_000.5, 401_199.5, 5_220_099.5), cellSizeM: 5 }
		],
		{ via: 'import', file: 'invented.geojson' }
	);
	if (!('ids' in result)) throw new Error(JSON.stringify(result));
	const home = await fields.get(actor, result.ids[0]);
	expect(home?.name).toBe('Home Paddock');
	// 399 m x 299 m less a 50 m x 50 m hole, in UTM metres; the ellipsoidal area differs from the
	// projected one by the UTM scale factor (k about 0.9997 here, so k^2 about 0.9994; Snyder 1987, eq. 8-1).
	expect(home!.areaM2 / (399 * 299 - 50 * 50)).toBeGreaterThan(1.0004);
	expect(home!.areaM2 / (399 * 299 - 50 * 50)).toBeLessThan(1.0009);
	expect(home!.boundary.coordinates).toHaveLength(2);
	expect([home!.gridEpsg, home!.gridCellM, home!.gridOriginX, home!.gridOriginY, home!.gridCols, home!.gridRows]).toEqual([32611, 10, 400_000, 5_220_000, 40, 30]);
	const back = await fields.get(actor, result.ids[1]);
	expect([back!.gridCellM, back!.gridOriginX, back!.gridCols, back!.gridRows]).toEqual([5, 401_000, 40, 20]);
	expect((await auditOf(actor.farm.id)).map((e) => [e.action, e.detail?.name, e.detail?.file])).toEqual([
		['field.created', 'Home Paddock', 'invented.geojson'],
		['field.created', 'Back Forty', 'invented.geojson']
	]);
});

test('createMany saves nothing when one item fails, and names each failing item', async () => {
	const actor = await managerOfNewFarm();
	await makeField(actor.farm.id, 'North');
	const bowTie: Polygon = { type: 'Polygon', coordinates: [[[0, 0], [0.01, 0.01], [0.01, 0], [0, 0.01], [0, 0]]] };
	const bad = await fields.createMany(
		actor,
		[
			{ name: 'Fine', boundary: withHole, cellSizeM: 10 },
			{ name: 'Crossed', boundary: bowTie, cellSizeM: 10 },
			{ name: '', boundary: withHole, cellSizeM: 10 }
		],
		{ via: 'import' }
	);
	expect(bad).toEqual({
		problems: [
			{ index: 1, message: 'Invalid boundary: the boundary crosses itself near 0.005000, 0.005000.' },
			{ index: 2, message: 'Give the field a name.' }
		]
	});
	const clash = await fields.createMany(
		actor,
		[
			{ name: 'Fine', boundary: withHole, cellSizeM: 10 },
			{ name: 'north', boundary: withHole, cellSizeM: 10 },
			{ name: 'FINE', boundary: withHole, cellSizeM: 10 }
		],
		{ via: 'import' }
	);
	expect(clash).toEqual({
		problems: [
			{ index: 1, message: 'A field named “north” already exists in this farm.' },
			{ index: 2, message: '“FINE” is also the name of item 1.' }
		]
	});
	expect((await fields.list(actor)).map((f) => f.name)).toEqual(['North']);
});

test('rename: trimmed, unique in the farm ignoring case, audited with old and new name', async () => {
	const actor = await managerOfNewFarm();
	const a = await makeField(actor.farm.id, 'A');
	await makeField(actor.farm.id, 'B');
	expect(await fields.rename(actor, a.id, ' b ')).toEqual({ error: 'A field named “b” already exists in this farm.' });
	expect(await fields.rename(actor, a.id, 'x'.repeat(121))).toEqual({ error: 'Use at most 120 characters (this name has 121).' });
	expect(await fields.rename(actor, a.id, '  Creek  ')).toEqual({ ok: true });
	expect((await fields.get(actor, a.id))?.name).toBe('Creek');
	// The boundary is untouched by a rename.
	expect((await fields.get(actor, a.id))?.boundary).toEqual(a.boundary);
	const entries = await auditOf(actor.farm.id);
	expect(entries.map((e) => [e.action, e.targetId, e.detail])).toEqual([['field.renamed', a.id, { from: 'A', to: 'Creek' }]]);
});

test('editing a boundary recomputes the area and keeps the grid origin and cell size, growing cols/rows', async () => {
	const actor = await managerOfNewFarm();
	const made = await fields.createMany(actor, [{ name: 'Edit me', boundary: withHole, cellSizeM: 10 }], { via: 'draw' });
	if (!('ids' in made)) throw new Error(JSON.stringify(made));
	const id = made.ids[0];
	const before = (await fields.get(actor, id))!;
	const bigger = rectangleUtm(400_000.5, 5_220_000.5, 400_454.5, 5_220_354.5);
	const result = await fields.updateBoundary(actor, id, bigger);
	expect(result && 'ok' in result).toBe(true);
	const after = (await fields.get(actor, id))!;
	expect(after.boundary).toEqual(bigger);
	expect(after.areaM2 / (454 * 354)).toBeGreaterThan(1.0004);
	expect(after.areaM2 / (454 * 354)).toBeLessThan(1.0009);
	expect([after.gridProj, after.gridCellM, after.gridOriginX, after.gridOriginY]).toEqual([before.gridProj, 10, 400_000, 5_220_000]);
	expect([after.gridCols, after.gridRows]).toEqual([46, 36]);
	expect(after.updatedAt.getTime()).toBeGreaterThanOrEqual(before.updatedAt.getTime());
	const edited = (await auditOf(actor.farm.id)).find((e) => e.action === 'field.boundary_edited');
	expect(edited?.detail).toMatchObject({ areaM2Before: before.areaM2, areaM2After: after.areaM2 });

	expect(await fields.updateBoundary(actor, id, { type: 'Polygon', coordinates: [[[0, 0], [1, 1], [0, 0]]] })).toEqual({
		error: 'Invalid boundary: outer ring has fewer than 3 distinct corners.'
	});
	// With no computed cells yet, a boundary reaching 25 m west moves the origin by 3 whole cells.
	await fields.updateBoundary(actor, id, rectangleUtm(399_975.5, 5_220_000.5, 400_399.5, 5_220_299.5));
	const moved = (await fields.get(actor, id))!;
	expect([moved.gridOriginX, moved.gridOriginY, moved.gridCols]).toEqual([399_970, 5_220_000, 49]);
});

test('delete removes the field and audits it; another farm’s field is out of reach for every call', async () => {
	const actor = await managerOfNewFarm();
	const elsewhere = await managerOfNewFarm();
	const theirs = await makeField(elsewhere.farm.id, 'Theirs');
	expect(await fields.get(actor, theirs.id)).toBeNull();
	expect(await fields.rename(actor, theirs.id, 'Mine now')).toBeNull();
	expect(await fields.updateBoundary(actor, theirs.id, withHole)).toBeNull();
	expect(await fields.remove(actor, theirs.id)).toBe(false);
	expect((await fields.get(elsewhere, theirs.id))?.name).toBe('Theirs');

	const mine = await makeField(actor.farm.id, 'Mine');
	expect(await fields.remove(actor, mine.id)).toBe(true);
	expect(await fields.get(actor, mine.id)).toBeNull();
	const [entry] = await db.select().from(auditLog).where(and(eq(auditLog.farmId, actor.farm.id), eq(auditLog.action, 'field.deleted')));
	expect(entry.detail).toMatchObject({ name: 'Mine' });
});

test('operators and agronomists may view but not edit; landlords may not open fields at all', async () => {
	const farm = await makeFarm();
	const field = await makeField(farm.id, 'Seen');
	for (const role of ['operator', 'agronomist'] as const) {
		const user = await makeUser();
		await join(farm.id, user.id, role);
		const actor = await requireRole(eventFor(user, { farm: farm.slug }), 'fields');
		expect((await fields.get(actor, field.id))?.name).toBe('Seen');
		await expect(requireRole(eventFor(user, { farm: farm.slug }), 'fields.edit')).rejects.toMatchObject({ status: 403 });
		await expect(fields.rename(actor, field.id, 'Nope')).rejects.toThrow(`role ${role} may not edit fields`);
		await expect(fields.remove(actor, field.id)).rejects.toThrow();
	}
	const landlord = await makeUser();
	await join(farm.id, landlord.id, 'landlord');
	await expect(requireRole(eventFor(landlord, { farm: farm.slug }), 'fields')).rejects.toMatchObject({ status: 403 });
	expect((await fields.get({ user: landlord, farm, role: 'landlord' }, field.id))).toBeNull();
});

test('featureCollection gives each visible field as a GeoJSON feature with id, name and area', async () => {
	const actor = await managerOfNewFarm();
	const f = await makeField(actor.farm.id, 'Only');
	const fc = await fields.featureCollection(actor);
	expect(fc.features).toEqual([
		{ type: 'Feature', id: f.id, properties: { id: f.id, name: 'Only', areaM2: f.areaM2 }, geometry: f.boundary }
	]);
});
