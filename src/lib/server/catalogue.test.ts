import { isActionFailure } from '@sveltejs/kit';
import { and, eq } from 'drizzle-orm';
import { describe, expect, test } from 'vitest';
import { db } from '$lib/server/db';
import { applications, auditLog, fields, machines, products, type Role } from '$lib/server/db/schema';
import { requireMember } from '$lib/server/auth/guard';
import { eventFor, join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import * as catalogue from './catalogue';
import { actions, load } from '../../routes/(app)/[farm]/catalogue/+page.server';

// Invented catalogue rows; rates in SI (1 L/ha = 1e-4 L/m2).
const perHa = (v: number) => v / 1e4;
const boom = {
	name: 'Test boom 36.6 m',
	boomWidthM: 36.576,
	nozzleCount: 144,
	nozzleSpacingM: 0.254,
	nozzlesPerSensor: 4,
	nozzleFlowLPerS: null,
	referencePressurePa: null
};

async function farmWith(...roles: Role[]) {
	const farm = await makeFarm();
	const people = [];
	for (const role of roles) {
		const user = await makeUser();
		await join(farm.id, user.id, role);
		people.push({ user, actor: await requireMember(eventFor(user, { farm: farm.slug })) });
	}
	return { farm, people };
}


function post(user: Awaited<ReturnType<typeof makeUser>>, slug: string, values: Record<string, string | string[]>) {
	const body = new FormData();
	for (const [k, v] of Object.entries(values)) for (const one of [v].flat()) body.append(k, one);
	const event = eventFor(user, { farm: slug }, `/${slug}/catalogue`);
	return Object.assign(event, { request: new Request(`http://127.0.0.1/${slug}/catalogue`, { method: 'POST', body }) });
}

describe('scoping by farm', () => {
	test('another farm’s machine is invisible, and cannot be updated or deleted', async () => {
		const a = await farmWith('manager');
		const b = await farmWith('manager');
		const [managerA] = a.people;
		const [managerB] = b.people;
		const made = await catalogue.createMachine(managerA.actor, boom);
		if (!made.ok) throw new Error(made.message);

		expect(await catalogue.listMachines(managerB.actor)).toEqual([]);
		expect(await catalogue.getMachine(managerB.actor, made.value.id)).toBeNull();
		const update = await catalogue.updateMachine(managerB.actor, made.value.id, { ...boom, name: 'Taken over' });
		expect(update).toEqual({ ok: false, status: 404, message: 'No such machine in this farm.' });
		expect((await catalogue.deleteMachine(managerB.actor, made.value.id)).ok).toBe(false);

		const [row] = await db.select().from(machines).where(eq(machines.id, made.value.id));
		expect(row.name).toBe('Test boom 36.6 m');
		expect((await catalogue.listMachines(managerA.actor)).map((m) => m.name)).toEqual(['Test boom 36.6 m']);
	});

	test('a tank mix cannot use another farm’s product, and the same names may exist in two farms', async () => {
		const a = await farmWith('manager');
		const b = await farmWith('manager');
		const productA = await catalogue.createProduct(a.people[0].actor, { name: 'Glyphosate (test)', registrationNumber: null, unit: 'L', pricePerUnit: 7 });
		if (!productA.ok) throw new Error(productA.message);
		const mix = await catalogue.createTankMix(b.people[0].actor, {
			name: 'Borrowed',
			carrierRateLPerM2: perHa(100),
			notes: null,
			products: [{ productId: productA.value.id, ratePerM2: perHa(1.5) }]
		});
		expect(mix).toMatchObject({ ok: false, status: 404, field: 'products' });
		const sameName = await catalogue.createProduct(b.people[0].actor, { name: 'Glyphosate (test)', registrationNumber: null, unit: 'L', pricePerUnit: 8 });
		expect(sameName.ok).toBe(true);
	});

	test('a malformed id is "not found", not a database error', async () => {
		const { people } = await farmWith('manager');
		expect(await catalogue.getMachine(people[0].actor, 'not-a-uuid')).toBeNull();
		expect(await catalogue.deleteProduct(people[0].actor, "1' or '1'='1")).toMatchObject({ ok: false, status: 404 });
	});
});

describe('roles', () => {
	test('an operator gets no prices from the data functions or in the page data; an agronomist does', async () => {
		const { farm, people } = await farmWith('manager', 'operator', 'agronomist');
		const [manager, operator, agronomist] = people;
		await catalogue.createProduct(manager.actor, { name: 'Priced (test)', registrationNumber: 'TEST-0001', unit: 'L', pricePerUnit: 123.456 });

		const seenByOperator = await catalogue.listProducts(operator.actor);
		expect(seenByOperator).toHaveLength(1);
		expect(seenByOperator[0]).not.toHaveProperty('pricePerUnit');
		expect((await catalogue.listProducts(agronomist.actor))[0].pricePerUnit).toBe(123.456);

		const page = await load(eventFor(operator.user, { farm: farm.slug }) as never);
		expect(JSON.stringify(page)).not.toContain('123.456');
		expect(page).toMatchObject({ canEdit: false, canSeePrices: false });
	});

	test('only a manager changes the catalogue: the data layer and every action answer 403 to others', async () => {
		const { farm, people } = await farmWith('manager', 'operator', 'agronomist');
		const [manager, operator, agronomist] = people;
		const made = await catalogue.createMachine(manager.actor, boom);
		if (!made.ok) throw new Error(made.message);
		for (const who of [operator, agronomist]) {
			expect(await statusOf(catalogue.createMachine(who.actor, boom))).toBe(403);
			expect(await statusOf(catalogue.deleteMachine(who.actor, made.value.id))).toBe(403);
			const form = { id: made.value.id, name: 'Renamed', boomWidth: '36.576', nozzleCount: '144', nozzleSpacing: '25.4' };
			expect(await statusOf(actions.saveMachine(post(who.user, farm.slug, form) as never) as Promise<unknown>)).toBe(403);
			expect(await statusOf(actions.deleteMachine(post(who.user, farm.slug, { id: made.value.id }) as never) as Promise<unknown>)).toBe(403);
		}
		expect((await catalogue.getMachine(manager.actor, made.value.id))?.name).toBe('Test boom 36.6 m');
	});
});

describe('the actions', () => {
	test('a machine typed in US units (120 ft, 144 nozzles, 10 in) is stored in SI (36.576 m, 0.254 m; NIST SP 811)', async () => {
		const { farm, people } = await farmWith('manager');
		const us = { ...people[0].user, units: 'us' as const };
		const result = await actions.saveMachine(
			post(us, farm.slug, {
				id: '',
				name: 'US boom',
				boomWidth: '120',
				nozzleCount: '144',
				nozzleSpacing: '10',
				nozzlesPerSensor: '1',
				nozzleFlow: '0.4',
				referencePressure: '40'
			}) as never
		);
		expect(result).toMatchObject({ section: 'machines', saved: 'Machine “US boom” added.' });
		const [row] = await db.select().from(machines).where(eq(machines.farmId, farm.id));
		expect(row.boomWidthM).toBeCloseTo(36.576, 12);
		expect(row.nozzleSpacingM).toBeCloseTo(0.254, 12);
		expect(row.nozzleFlowLPerS! * 60).toBeCloseTo(0.4 * 3.785411784, 12); // 0.4 gal/min in L/min
		expect(row.referencePressurePa! / 1000).toBeCloseTo(275.79, 2); // 40 psi, DOMAIN.md check 10
	});

	test('a refused form comes back as a 400 with what was typed and a message per field', async () => {
		const { farm, people } = await farmWith('manager');
		const result = await actions.saveMachine(
			post(people[0].user, farm.slug, { id: '', name: '', boomWidth: '30', nozzleCount: '144', nozzleSpacing: '25.4' }) as never
		);
		if (!isActionFailure(result)) throw new Error('expected a failure');
		expect(result.status).toBe(400);
		const data = result.data as unknown as { values: Record<string, string>; problems: Record<string, string> };
		expect(data.values).toMatchObject({ boomWidth: '30', nozzleCount: '144' });
		expect(Object.keys(data.problems).sort()).toEqual(['boomWidth', 'name']);
		expect(await db.select().from(machines).where(eq(machines.farmId, farm.id))).toEqual([]);
	});
});

describe('what a change may not break', () => {
	test('a product in a tank mix cannot be deleted or change unit; the message names the mix', async () => {
		const { people } = await farmWith('manager');
		const actor = people[0].actor;
		const product = await catalogue.createProduct(actor, { name: 'Dicamba (test)', registrationNumber: null, unit: 'L', pricePerUnit: null });
		if (!product.ok) throw new Error(product.message);
		const mix = await catalogue.createTankMix(actor, {
			name: 'Knockdown (test)',
			carrierRateLPerM2: perHa(100),
			notes: 'Invented for a test.',
			products: [{ productId: product.value.id, ratePerM2: perHa(0.3) }]
		});
		if (!mix.ok) throw new Error(mix.message);
		expect(mix.value.products).toEqual([{ productId: product.value.id, name: 'Dicamba (test)', unit: 'L', ratePerM2: perHa(0.3) }]);

		const refused = await catalogue.deleteProduct(actor, product.value.id);
		expect(refused).toMatchObject({ ok: false, status: 409 });
		if (!refused.ok) expect(refused.message).toContain('“Knockdown (test)”');
		const toKg = await catalogue.updateProduct(actor, product.value.id, { name: 'Dicamba (test)', registrationNumber: null, unit: 'kg', pricePerUnit: null });
		expect(toKg).toMatchObject({ ok: false, status: 409, field: 'unit' });

		expect((await catalogue.deleteTankMix(actor, mix.value.id)).ok).toBe(true);
		expect((await catalogue.deleteProduct(actor, product.value.id)).ok).toBe(true);
		expect(await db.select().from(products).where(eq(products.id, product.value.id))).toEqual([]);
	});

	test('a tank mix that applications were computed with cannot be deleted', async () => {
		const { farm, people } = await farmWith('manager');
		const actor = people[0].actor;
		const mix = await catalogue.createTankMix(actor, { name: 'Used mix (test)', carrierRateLPerM2: perHa(80), notes: null, products: [] });
		if (!mix.ok) throw new Error(mix.message);
		// An invented field and application, written directly: only the link to the mix matters here.
		const [field] = await db
			.insert(fields)
			.values({
				farmId: farm.id,
				name: 'Test field',
				boundary: { type: 'Polygon', coordinates: [[[0, 0], [0.001, 0], [0.001, 0.001], [0, 0]]] },
				areaM2: 6000,
				gridProj: '+proj=utm +zone=31 +datum=WGS84 +units=m +no_defs',
				gridEpsg: 32631,
				gridOriginX: 166020,
				gridOriginY: 0,
				gridCols: 12,
				gridRows: 12
			})
			.returning();
		const at = new Date('2026-04-01T08:00:00Z');
		await db.insert(applications).values({
			farmId: farm.id,
			fieldId: field.id,
			tankMixId: mix.value.id,
			day: '2026-04-01',
			season: 2026,
			startedAt: at,
			endedAt: at,
			fixCount: 2,
			coveredM2: 10,
			sprayedM2: 1,
			volumeL: 0.01
		});
		const refused = await catalogue.deleteTankMix(actor, mix.value.id);
		expect(refused).toMatchObject({ ok: false, status: 409 });
		if (!refused.ok) expect(refused.message).toContain('an application');
		expect(await catalogue.getTankMix(actor, mix.value.id)).not.toBeNull();
	});

	test('names are unique in a farm, ignoring case and spaces', async () => {
		const { people } = await farmWith('manager');
		const actor = people[0].actor;
		expect((await catalogue.createMachine(actor, boom)).ok).toBe(true);
		expect(await catalogue.createMachine(actor, { ...boom, name: '  test BOOM 36.6 m ' })).toMatchObject({ ok: false, status: 409, field: 'name' });
	});
});

test('creates, updates and deletes are in the audit log with who and what', async () => {
	const { farm, people } = await farmWith('manager');
	const { actor, user } = people[0];
	const made = await catalogue.createMachine(actor, boom);
	if (!made.ok) throw new Error(made.message);
	await catalogue.updateMachine(actor, made.value.id, { ...boom, nozzleCount: 72, nozzleSpacingM: 0.508 });
	await catalogue.deleteMachine(actor, made.value.id);
	const entries = await db
		.select()
		.from(auditLog)
		.where(and(eq(auditLog.farmId, farm.id), eq(auditLog.targetId, made.value.id)))
		.orderBy(auditLog.at);
	expect(entries.map((e) => [e.action, e.actorId])).toEqual([
		['machine.created', user.id],
		['machine.updated', user.id],
		['machine.deleted', user.id]
	]);
	expect(entries[1].detail).toMatchObject({ before: { nozzleCount: 144 }, after: { nozzleCount: 72, nozzleSpacingM: 0.508 } });
});
