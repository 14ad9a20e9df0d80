import { and, eq, sql } from 'drizzle-orm';
import { describe, expect, test } from 'vitest';
import { emptyInput, type RecordInput } from '$lib/records/facts';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import type { Actor } from '$lib/server/auth/guard';
import { db } from '$lib/server/db';
import {
	applicationFixes,
	applications,
	auditLog,
	farms,
	fields,
	machines,
	products,
	rawFiles,
	tankMixProducts,
	tankMixes,
	uploads,
	type Role
} from '$lib/server/db/schema';
import { packFixes } from '$lib/server/ingest/pack';
import { join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import * as records from './records';

const boundary = {
	type: 'Polygon' as const,
	coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]]
};

async function actorFor(farm: typeof farms.$inferSelect, role: Role) {
	const user = await makeUser();
	await join(farm.id, user.id, role);
	return { user, farm: { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency }, role } satisfies Actor;
}

/** A farm with a field, a machine, a two-product mix and one application from the operator's upload. */
async function setUp() {
	const farm = await makeFarm();
	const manager = await actorFor(farm, 'manager');
	const operator = await actorFor(farm, 'operator');
	const [field] = await db.insert(fields).values({ farmId: farm.id, name: 'North Flat', ...fieldGeometryColumns(boundary) }).returning();
	const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', boomWidthM: 36.576, nozzleCount: 144, nozzleSpacingM: 0.254 }).returning();
	const [gly] = await db.insert(products).values({ farmId: farm.id, name: 'Glyphosate (test)', unit: 'L', registrationNumber: 'TEST-REG-1', pricePerUnit: 6.4 }).returning();
	const [flu] = await db.insert(products).values({ farmId: farm.id, name: 'Flumioxazin (test)', unit: 'kg', registrationNumber: null }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Knockdown', carrierRateLPerM2: 0.01 }).returning();
	await db.insert(tankMixProducts).values([
		{ tankMixId: mix.id, productId: gly.id, ratePerM2: 0.00015 },
		{ tankMixId: mix.id, productId: flu.id, ratePerM2: 0.000021 }
	]);
	const app = await makeApplication(farm.id, field.id, mix.id, machine.id, '2025-04-14', operator.user.id);
	return { farm, manager, operator, field, machine, gly, flu, mix, app };
}

let shaCounter = 0;
async function makeApplication(farmId: string, fieldId: string, tankMixId: string, machineId: string, day: string, uploadedBy: string) {
	const [app] = await db
		.insert(applications)
		.values({
			farmId,
			fieldId,
			tankMixId,
			machineId,
			day,
			season: Number(day.slice(0, 4)),
			startedAt: new Date(`${day}T15:14:00Z`),
			endedAt: new Date(`${day}T18:32:00Z`),
			fixCount: 2,
			coveredM2: 400_000,
			sprayedM2: 60_000,
			volumeL: 600
		})
		.returning();
	const sha256 = `${Date.now().toString(16)}${(shaCounter++).toString(16)}`.padEnd(64, '0');
	await db.insert(rawFiles).values({ sha256, sizeBytes: 10 });
	const [upload] = await db.insert(uploads).values({ farmId, uploadedBy, fileName: `${day}.csv`, sha256, sizeBytes: 10, format: 'csv', status: 'done' }).returning();
	const fixes = {
		count: 2,
		timeS: Float64Array.from([1, 2]),
		lng: Float64Array.from([-118.31, -118.3099]),
		lat: Float64Array.from([47.125, 47.125]),
		spray: { kind: 'fraction' as const, fraction: Float32Array.from([1, 1]) },
		sourceRow: Uint32Array.from([2, 3])
	};
	await db.insert(applicationFixes).values({ applicationId: app.id, uploadId: upload.id, fixCount: 2, packed: packFixes(fixes) });
	return app;
}

function completeInput(ctx: Awaited<ReturnType<typeof setUp>>, overrides: Partial<RecordInput> = {}): RecordInput {
	return {
		...emptyInput(),
		applicatorName: 'Sam Reyes',
		applicatorCertification: 'WA-12345',
		clientName: 'Tallowgrass Farm',
		clientAddress: '1 Road, Town',
		crop: 'Fallow',
		targetWeeds: 'Kochia',
		windSpeedMPerS: 2.5,
		windFrom: 'SW',
		airTemperatureC: 14,
		relativeHumidityPercent: 55,
		registrationNumbers: { [ctx.gly.id]: 'TEST-REG-1', [ctx.flu.id]: 'TEST-REG-2' },
		...overrides
	};
}

describe('reading records', () => {
	test('an application is a record to complete, pre-filled from the log, the catalogue and the farm', async () => {
		const ctx = await setUp();
		const [row] = await records.list(ctx.operator);
		expect(row).toMatchObject({ key: ctx.app.id, status: 'none', fieldName: 'North Flat', productNames: ['Flumioxazin (test)', 'Glyphosate (test)'] });

		const view = (await records.get(ctx.operator, ctx.app.id))!;
		expect(view.canEdit).toBe(true);
		expect(view.facts).toMatchObject({ fieldName: 'North Flat', day: '2025-04-14', coveredM2: 400_000, sprayedM2: 60_000, volumeL: 600, machineName: 'Boom' });
		// Applied = volume x product rate / carrier rate: 600 L x 1.5 L/ha / 100 L/ha = 9 L.
		expect(view.facts.products.find((p) => p.name === 'Glyphosate (test)')!.appliedUnits).toBeCloseTo(9, 9);
		expect(view.input.applicatorName).toBe(ctx.operator.user.name);
		expect(view.input.clientName).toBe(ctx.farm.name);
		expect(view.input.registrationNumbers).toEqual({ [ctx.gly.id]: 'TEST-REG-1' });
		expect(view.prefilled).toEqual(expect.arrayContaining(['your account', 'the farm’s name', 'the catalogue']));
		// The point lies inside the field.
		expect(view.facts.fieldPoint[0]).toBeGreaterThan(-118.32);
		expect(view.facts.fieldPoint[1]).toBeLessThan(47.129);
		// No price anywhere in a record.
		expect(JSON.stringify(view)).not.toContain('6.4');
	});

	test('landlords get no records; another farm’s application is not found', async () => {
		const ctx = await setUp();
		const landlord = await actorFor(ctx.farm, 'landlord');
		expect(await statusOf(records.list(landlord))).toBe(403);
		const other = await setUp();
		expect(await records.get(ctx.manager, other.app.id)).toBeNull();
		expect(await records.get(ctx.manager, 'not-a-uuid')).toBeNull();
	});

	test('an operator completes only the records of their own uploads; a manager any', async () => {
		const ctx = await setUp();
		const colleague = await actorFor(ctx.farm, 'operator');
		const view = (await records.get(colleague, ctx.app.id))!;
		expect(view.canEdit).toBe(false);
		expect(view.readOnlyReason).toMatch(/operator who uploaded this log/);
		expect(await statusOf(records.saveDraft(colleague, ctx.app.id, completeInput(ctx)))).toBe(403);
		expect((await records.get(ctx.manager, ctx.app.id))!.canEdit).toBe(true);
	});
});

describe('sign-off and amendments', () => {
	test('a draft is saved; sign-off checks every required element, then locks the record', async () => {
		const ctx = await setUp();
		expect((await records.saveDraft(ctx.operator, ctx.app.id, { ...emptyInput(), crop: 'Fallow' })).ok).toBe(true);
		expect((await records.get(ctx.operator, ctx.app.id))!).toMatchObject({ status: 'draft', input: { crop: 'Fallow' } });

		const refused = await records.sign(ctx.operator, ctx.app.id, completeInput(ctx, { windFrom: '', registrationNumbers: { [ctx.gly.id]: 'TEST-REG-1' } }));
		expect(refused.ok).toBe(false);
		if (!refused.ok) {
			expect(refused.message).toBe('2 elements are still missing; the record was not signed.');
			expect(refused.problems).toEqual({
				windFrom: 'Wind from is needed before the record can be signed.',
				[`reg-${ctx.flu.id}`]: 'The registration number of Flumioxazin (test) is needed before the record can be signed.'
			});
		}

		const signed = await records.sign(ctx.operator, ctx.app.id, completeInput(ctx));
		expect(signed.ok).toBe(true);
		const view = (await records.get(ctx.operator, ctx.app.id))!;
		expect(view).toMatchObject({ status: 'signed', signedByName: ctx.operator.user.name, input: { applicatorCertification: 'WA-12345' } });
		const [entry] = await db.select().from(auditLog).where(and(eq(auditLog.farmId, ctx.farm.id), eq(auditLog.action, 'record.signed')));
		expect(entry.actorId).toBe(ctx.operator.user.id);

		// Locked: no more drafts, no second signature.
		const draft = await records.saveDraft(ctx.operator, ctx.app.id, completeInput(ctx, { crop: 'Wheat' }));
		expect(draft.ok === false && draft.status).toBe(409);
		expect((await records.sign(ctx.manager, ctx.app.id, completeInput(ctx))).ok).toBe(false);
		expect((await records.get(ctx.manager, ctx.app.id))!.input.crop).toBe('Fallow');
	});

	test('after sign-off an edit is an amendment with its reason, who and when; the audit log has it', async () => {
		const ctx = await setUp();
		await records.sign(ctx.operator, ctx.app.id, completeInput(ctx));
		const noReason = await records.amend(ctx.manager, ctx.app.id, completeInput(ctx, { windFrom: 'W' }), ' ', 'metric');
		expect(noReason.ok === false && noReason.problems?.reason).toMatch(/Say why/);
		const same = await records.amend(ctx.manager, ctx.app.id, completeInput(ctx), 'checking', 'metric');
		expect(same.ok === false && same.message).toBe('Nothing was changed, so there is nothing to amend.');
		const blank = await records.amend(ctx.manager, ctx.app.id, completeInput(ctx, { crop: '' }), 'oops', 'metric');
		expect(blank.ok === false && blank.problems?.crop).toBeDefined();

		const done = await records.amend(ctx.manager, ctx.app.id, completeInput(ctx, { windFrom: 'W', windSpeedMPerS: 3 }), 'Wind direction misread', 'metric');
		expect(done.ok).toBe(true);
		const view = (await records.get(ctx.operator, ctx.app.id))!;
		expect(view.status).toBe('signed');
		expect(view.input.windFrom).toBe('W');
		expect(view.amendments).toHaveLength(1);
		expect(view.amendments[0]).toMatchObject({
			byName: ctx.manager.user.name,
			reason: 'Wind direction misread',
			changes: [
				{ field: 'windSpeedMPerS', label: 'Wind speed', before: '9 km/h', after: '10.8 km/h' },
				{ field: 'windFrom', label: 'Wind from', before: 'SW', after: 'W' }
			]
		});
		const [row] = await records.list(ctx.manager, { status: 'signed' });
		expect(row.amendments).toBe(1);
		const entries = await db.select().from(auditLog).where(and(eq(auditLog.farmId, ctx.farm.id), eq(auditLog.action, 'record.amended')));
		expect(entries).toHaveLength(1);
		expect(entries[0].detail).toMatchObject({ reason: 'Wind direction misread' });
	});

	test('a signed record keeps the figures it was signed with; a re-process shows the new ones beside them', async () => {
		const ctx = await setUp();
		await records.sign(ctx.operator, ctx.app.id, completeInput(ctx));
		await db.update(applications).set({ volumeL: 620 }).where(eq(applications.id, ctx.app.id));
		const view = (await records.get(ctx.manager, ctx.app.id))!;
		expect(view.facts.volumeL).toBe(600);
		expect(view.factsNow?.volumeL).toBe(620);
	});

	test('a signed record outlives its application; a draft does not stay listed', async () => {
		const ctx = await setUp();
		await records.sign(ctx.operator, ctx.app.id, completeInput(ctx));
		const other = await makeApplication(ctx.farm.id, ctx.field.id, ctx.mix.id, ctx.machine.id, '2025-04-15', ctx.operator.user.id);
		await records.saveDraft(ctx.operator, other.id, completeInput(ctx));
		await db.delete(applications).where(sql`${applications.farmId} = ${ctx.farm.id}`);
		const listed = await records.list(ctx.manager);
		expect(listed).toHaveLength(1);
		expect(listed[0]).toMatchObject({ applicationId: null, status: 'signed', day: '2025-04-14', fieldName: 'North Flat' });
		const view = (await records.get(ctx.manager, listed[0].key))!;
		expect(view).toMatchObject({ status: 'signed', canEdit: false, facts: { volumeL: 600 } });
	});
});

describe('the list and its filters', () => {
	test('by season, field, product, applicator and state; the next record is pre-filled from the last', async () => {
		const ctx = await setUp();
		const [east] = await db.insert(fields).values({ farmId: ctx.farm.id, name: 'East Bench', ...fieldGeometryColumns(boundary) }).returning();
		const [mix2] = await db.insert(tankMixes).values({ farmId: ctx.farm.id, name: 'Glyphosate only', carrierRateLPerM2: 0.01 }).returning();
		await db.insert(tankMixProducts).values({ tankMixId: mix2.id, productId: ctx.gly.id, ratePerM2: 0.00015 });
		const later = await makeApplication(ctx.farm.id, ctx.field.id, mix2.id, ctx.machine.id, '2025-06-02', ctx.operator.user.id);
		const older = await makeApplication(ctx.farm.id, east.id, ctx.mix.id, ctx.machine.id, '2024-04-10', ctx.operator.user.id);
		await records.sign(ctx.operator, ctx.app.id, completeInput(ctx));

		const keys = async (f: records.RecordFilters) => (await records.list(ctx.manager, f)).map((r) => r.key);
		expect(await keys({})).toEqual([later.id, ctx.app.id, older.id]);
		expect(await keys({ season: 2025 })).toEqual([later.id, ctx.app.id]);
		expect(await keys({ fieldId: east.id })).toEqual([older.id]);
		expect(await keys({ productId: ctx.flu.id })).toEqual([ctx.app.id, older.id]);
		expect(await keys({ applicator: 'Sam Reyes' })).toEqual([ctx.app.id]);
		expect(await keys({ status: 'todo', season: 2025 })).toEqual([later.id]);
		expect((await records.filterOptions(ctx.manager)).applicators).toEqual(['Sam Reyes']);

		// The same field's next record this season: crop and target from the last one, the
		// certification from this person's last, weather never.
		const next = (await records.get(ctx.operator, later.id))!;
		expect(next.input).toMatchObject({ applicatorName: 'Sam Reyes', applicatorCertification: 'WA-12345', crop: 'Fallow', targetWeeds: 'Kochia', clientAddress: '1 Road, Town', windSpeedMPerS: null });
		// Another field: no crop carried over.
		expect((await records.get(ctx.operator, older.id))!.input.crop).toBe('');
	});
});
