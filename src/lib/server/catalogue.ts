// The farm's catalogue: machines, products and tank mixes, all in SI. Every query is scoped by
// the actor's farm; an id from another farm behaves exactly like an id that does not exist.
// Prices leave this module only for roles that may see them, so an operator's page data never
// holds one, not even hidden.
import { error } from '@sveltejs/kit';
import { and, asc, count, eq, inArray, ne, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { applications, farms, machines, products, tankMixProducts, tankMixes, type Machine } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import * as audit from '$lib/server/audit';

export type ProductUnit = 'L' | 'kg';

export type MachineInput = {
	name: string;
	boomWidthM: number;
	nozzleCount: number;
	nozzleSpacingM: number;
	nozzlesPerSensor: number;
	/** Nominal flow of one nozzle at the reference pressure, L/s. */
	nozzleFlowLPerS: number | null;
	referencePressurePa: number | null;
	/** Application-quality limits; absent or null = not checked. */
	maxSpeedMPerS?: number | null;
	targetHeightM?: number | null;
	heightToleranceM?: number | null;
	pressureMinPa?: number | null;
	pressureMaxPa?: number | null;
};

export type ProductInput = {
	name: string;
	registrationNumber: string | null;
	unit: ProductUnit;
	/** Per L or kg, in the farm's currency; ignored for a role that may not see prices. */
	pricePerUnit: number | null;
};

export type TankMixInput = {
	name: string;
	carrierRateLPerM2: number;
	notes: string | null;
	/** Broadcast label rates, in the product's unit per m2. */
	products: { productId: string; ratePerM2: number }[];
};

export type MachineView = Omit<Machine, 'farmId'>;

/** A product as the actor may see it: `pricePerUnit` is absent for roles without 'prices.view'. */
export type ProductView = {
	id: string;
	name: string;
	registrationNumber: string | null;
	unit: ProductUnit;
	pricePerUnit?: number | null;
};

export type TankMixView = {
	id: string;
	name: string;
	carrierRateLPerM2: number;
	notes: string | null;
	products: { productId: string; name: string; unit: ProductUnit; ratePerM2: number }[];
};

/** What a change did: done, or why not with a sentence to show and the HTTP status it means. */
export type Outcome<T = undefined> =
	| { ok: true; value: T }
	| { ok: false; status: 404 | 409; field?: string; message: string };

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
/** A malformed id is simply not found, instead of a Postgres type error. */
const isId = (id: string) => uuidPattern.test(id);

function requireEdit(actor: Actor) {
	// Routes check this too; the data layer refuses on its own so no caller can forget.
	if (!may(actor.role, 'catalogue.edit')) error(403, 'Your role in this farm does not allow changing the catalogue.');
}

/** Contract checks: the forms validate with messages first, so a breach here is a bug. */
function assertFinite(what: string, value: number | null, options: { positive?: boolean; integer?: boolean } = {}) {
	if (value === null) return;
	if (!Number.isFinite(value)) throw new Error(`${what} must be a finite number, got ${value}`);
	if (options.positive && !(value > 0)) throw new Error(`${what} must be positive, got ${value}`);
	if (options.integer && !Number.isInteger(value)) throw new Error(`${what} must be a whole number, got ${value}`);
}

function assertMachine(input: MachineInput) {
	if (!input.name.trim()) throw new Error('A machine needs a name');
	assertFinite('boomWidthM', input.boomWidthM, { positive: true });
	assertFinite('nozzleCount', input.nozzleCount, { positive: true, integer: true });
	assertFinite('nozzleSpacingM', input.nozzleSpacingM, { positive: true });
	assertFinite('nozzlesPerSensor', input.nozzlesPerSensor, { positive: true, integer: true });
	assertFinite('nozzleFlowLPerS', input.nozzleFlowLPerS, { positive: true });
	assertFinite('referencePressurePa', input.referencePressurePa, { positive: true });
	assertFinite('maxSpeedMPerS', input.maxSpeedMPerS ?? null, { positive: true });
	assertFinite('targetHeightM', input.targetHeightM ?? null, { positive: true });
	assertFinite('heightToleranceM', input.heightToleranceM ?? null, { positive: true });
	assertFinite('pressureMinPa', input.pressureMinPa ?? null, { positive: true });
	assertFinite('pressureMaxPa', input.pressureMaxPa ?? null, { positive: true });
	if ((input.targetHeightM ?? null) === null !== ((input.heightToleranceM ?? null) === null)) {
		throw new Error('targetHeightM and heightToleranceM go together');
	}
	if (input.pressureMinPa && input.pressureMaxPa && input.pressureMinPa >= input.pressureMaxPa) {
		throw new Error('pressureMinPa must be below pressureMaxPa');
	}
}

function assertProduct(input: ProductInput) {
	if (!input.name.trim()) throw new Error('A product needs a name');
	if (input.unit !== 'L' && input.unit !== 'kg') throw new Error(`A product's unit is L or kg, got ${input.unit}`);
	assertFinite('pricePerUnit', input.pricePerUnit);
	if (input.pricePerUnit !== null && input.pricePerUnit < 0) throw new Error('pricePerUnit must not be negative');
}

function assertTankMix(input: TankMixInput) {
	if (!input.name.trim()) throw new Error('A tank mix needs a name');
	assertFinite('carrierRateLPerM2', input.carrierRateLPerM2, { positive: true });
	const seen = new Set<string>();
	for (const p of input.products) {
		assertFinite('ratePerM2', p.ratePerM2, { positive: true });
		if (seen.has(p.productId)) throw new Error(`Product ${p.productId} is listed twice in one tank mix`);
		seen.add(p.productId);
	}
}

/** The farm's ISO 4217 currency, for showing prices. */
export async function currency(actor: Actor): Promise<string> {
	const [row] = await db.select({ currency: farms.currency }).from(farms).where(eq(farms.id, actor.farm.id));
	return row?.currency ?? 'USD';
}

// A name is unique in its table within a farm, ignoring case and surrounding spaces, so two
// "Glyphosate 540" rows never leave people guessing which one a record used.
async function nameTaken(
	table: typeof machines | typeof products | typeof tankMixes,
	actor: Actor,
	name: string,
	exceptId?: string
) {
	const rows = await db
		.select({ id: table.id })
		.from(table)
		.where(
			and(
				eq(table.farmId, actor.farm.id),
				sql`lower(trim(${table.name})) = lower(trim(${name}))`,
				exceptId ? ne(table.id, exceptId) : undefined
			)
		)
		.limit(1);
	return rows.length > 0;
}

const taken = (kind: string, name: string): Outcome<never> => ({
	ok: false,
	status: 409,
	field: 'name',
	message: `There is already a ${kind} called “${name.trim()}” in this farm; choose another name.`
});
const notFound = (kind: string): Outcome<never> => ({ ok: false, status: 404, message: `No such ${kind} in this farm.` });

// ---------------------------------------------------------------- machines

const machineColumns = {
	id: machines.id,
	name: machines.name,
	boomWidthM: machines.boomWidthM,
	nozzleCount: machines.nozzleCount,
	nozzleSpacingM: machines.nozzleSpacingM,
	nozzlesPerSensor: machines.nozzlesPerSensor,
	nozzleFlowLPerS: machines.nozzleFlowLPerS,
	referencePressurePa: machines.referencePressurePa,
	maxSpeedMPerS: machines.maxSpeedMPerS,
	targetHeightM: machines.targetHeightM,
	heightToleranceM: machines.heightToleranceM,
	pressureMinPa: machines.pressureMinPa,
	pressureMaxPa: machines.pressureMaxPa,
	createdAt: machines.createdAt
};

export function listMachines(actor: Actor): Promise<MachineView[]> {
	return db.select(machineColumns).from(machines).where(eq(machines.farmId, actor.farm.id)).orderBy(asc(machines.name));
}

export async function getMachine(actor: Actor, id: string): Promise<MachineView | null> {
	if (!isId(id)) return null;
	const [row] = await db
		.select(machineColumns)
		.from(machines)
		.where(and(eq(machines.id, id), eq(machines.farmId, actor.farm.id)));
	return row ?? null;
}

function machineValues(input: MachineInput) {
	return {
		name: input.name.trim(),
		boomWidthM: input.boomWidthM,
		nozzleCount: input.nozzleCount,
		nozzleSpacingM: input.nozzleSpacingM,
		nozzlesPerSensor: input.nozzlesPerSensor,
		nozzleFlowLPerS: input.nozzleFlowLPerS,
		referencePressurePa: input.referencePressurePa,
		maxSpeedMPerS: input.maxSpeedMPerS ?? null,
		targetHeightM: input.targetHeightM ?? null,
		heightToleranceM: input.heightToleranceM ?? null,
		pressureMinPa: input.pressureMinPa ?? null,
		pressureMaxPa: input.pressureMaxPa ?? null
	};
}

export async function createMachine(actor: Actor, input: MachineInput): Promise<Outcome<MachineView>> {
	requireEdit(actor);
	assertMachine(input);
	if (await nameTaken(machines, actor, input.name)) return taken('machine', input.name);
	const values = machineValues(input);
	const [row] = await db
		.insert(machines)
		.values({ ...values, farmId: actor.farm.id })
		.returning(machineColumns);
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'machine.created',
		targetType: 'machine',
		targetId: row.id,
		detail: values
	});
	return { ok: true, value: row };
}

export async function updateMachine(actor: Actor, id: string, input: MachineInput): Promise<Outcome<MachineView>> {
	requireEdit(actor);
	assertMachine(input);
	const before = await getMachine(actor, id);
	if (!before) return notFound('machine');
	if (await nameTaken(machines, actor, input.name, id)) return taken('machine', input.name);
	const values = machineValues(input);
	const [row] = await db
		.update(machines)
		.set(values)
		.where(and(eq(machines.id, id), eq(machines.farmId, actor.farm.id)))
		.returning(machineColumns);
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'machine.updated',
		targetType: 'machine',
		targetId: id,
		detail: { before: machineValues(before), after: values }
	});
	return { ok: true, value: row };
}

export async function deleteMachine(actor: Actor, id: string): Promise<Outcome<{ name: string }>> {
	requireEdit(actor);
	if (!isId(id)) return notFound('machine');
	// Uploads and applications keep their figures; their machine link is set to null by the schema.
	const [row] = await db
		.delete(machines)
		.where(and(eq(machines.id, id), eq(machines.farmId, actor.farm.id)))
		.returning({ name: machines.name });
	if (!row) return notFound('machine');
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'machine.deleted',
		targetType: 'machine',
		targetId: id,
		detail: { name: row.name }
	});
	return { ok: true, value: row };
}

// ---------------------------------------------------------------- products

export async function listProducts(actor: Actor): Promise<ProductView[]> {
	const rows = await db
		.select({
			id: products.id,
			name: products.name,
			registrationNumber: products.registrationNumber,
			unit: products.unit,
			pricePerUnit: products.pricePerUnit
		})
		.from(products)
		.where(eq(products.farmId, actor.farm.id))
		.orderBy(asc(products.name));
	if (may(actor.role, 'prices.view')) return rows;
	return rows.map(({ pricePerUnit: _, ...rest }) => rest);
}

async function productRow(actor: Actor, id: string) {
	if (!isId(id)) return null;
	const [row] = await db
		.select()
		.from(products)
		.where(and(eq(products.id, id), eq(products.farmId, actor.farm.id)));
	return row ?? null;
}

export async function createProduct(actor: Actor, input: ProductInput): Promise<Outcome<ProductView>> {
	requireEdit(actor);
	assertProduct(input);
	if (await nameTaken(products, actor, input.name)) return taken('product', input.name);
	const values = {
		name: input.name.trim(),
		registrationNumber: input.registrationNumber?.trim() || null,
		unit: input.unit,
		pricePerUnit: may(actor.role, 'prices.view') ? input.pricePerUnit : null
	};
	const [row] = await db
		.insert(products)
		.values({ ...values, farmId: actor.farm.id })
		.returning({ id: products.id });
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'product.created',
		targetType: 'product',
		targetId: row.id,
		detail: values
	});
	return { ok: true, value: { id: row.id, ...values } };
}

export async function updateProduct(actor: Actor, id: string, input: ProductInput): Promise<Outcome<ProductView>> {
	requireEdit(actor);
	assertProduct(input);
	const before = await productRow(actor, id);
	if (!before) return notFound('product');
	if (await nameTaken(products, actor, input.name, id)) return taken('product', input.name);
	if (input.unit !== before.unit) {
		// Rates in tank mixes are stored in the product's unit; switching L and kg would silently
		// turn 2 L/ha into 2 kg/ha.
		const [used] = await db.select({ n: count() }).from(tankMixProducts).where(eq(tankMixProducts.productId, id));
		if (used.n > 0) {
			return {
				ok: false,
				status: 409,
				field: 'unit',
				message: `${before.name} is in ${used.n === 1 ? 'a tank mix' : `${used.n} tank mixes`} with rates in ${before.unit}; its unit cannot change. Add a new product instead.`
			};
		}
	}
	const values = {
		name: input.name.trim(),
		registrationNumber: input.registrationNumber?.trim() || null,
		unit: input.unit,
		pricePerUnit: may(actor.role, 'prices.view') ? input.pricePerUnit : before.pricePerUnit
	};
	await db
		.update(products)
		.set(values)
		.where(and(eq(products.id, id), eq(products.farmId, actor.farm.id)));
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'product.updated',
		targetType: 'product',
		targetId: id,
		detail: {
			before: { name: before.name, registrationNumber: before.registrationNumber, unit: before.unit, pricePerUnit: before.pricePerUnit },
			after: values
		}
	});
	return { ok: true, value: { id, ...values } };
}

export async function deleteProduct(actor: Actor, id: string): Promise<Outcome<{ name: string }>> {
	requireEdit(actor);
	const product = await productRow(actor, id);
	if (!product) return notFound('product');
	const mixes = await db
		.select({ name: tankMixes.name })
		.from(tankMixProducts)
		.innerJoin(tankMixes, eq(tankMixes.id, tankMixProducts.tankMixId))
		.where(and(eq(tankMixProducts.productId, id), eq(tankMixes.farmId, actor.farm.id)))
		.orderBy(asc(tankMixes.name));
	if (mixes.length > 0) {
		const names = mixes.map((m) => `“${m.name}”`).join(', ');
		return {
			ok: false,
			status: 409,
			message: `${product.name} is used in the tank ${mixes.length === 1 ? 'mix' : 'mixes'} ${names}. Remove it from ${mixes.length === 1 ? 'that mix' : 'those mixes'} (or delete ${mixes.length === 1 ? 'it' : 'them'}) first.`
		};
	}
	await db.delete(products).where(and(eq(products.id, id), eq(products.farmId, actor.farm.id)));
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'product.deleted',
		targetType: 'product',
		targetId: id,
		detail: { name: product.name }
	});
	return { ok: true, value: { name: product.name } };
}

// ---------------------------------------------------------------- tank mixes

async function mixProducts(mixIds: string[]) {
	if (mixIds.length === 0) return [];
	return db
		.select({
			tankMixId: tankMixProducts.tankMixId,
			productId: tankMixProducts.productId,
			name: products.name,
			unit: products.unit,
			ratePerM2: tankMixProducts.ratePerM2
		})
		.from(tankMixProducts)
		.innerJoin(products, eq(products.id, tankMixProducts.productId))
		.where(inArray(tankMixProducts.tankMixId, mixIds))
		.orderBy(asc(products.name));
}

export async function listTankMixes(actor: Actor): Promise<TankMixView[]> {
	const mixes = await db
		.select({ id: tankMixes.id, name: tankMixes.name, carrierRateLPerM2: tankMixes.carrierRateLPerM2, notes: tankMixes.notes })
		.from(tankMixes)
		.where(eq(tankMixes.farmId, actor.farm.id))
		.orderBy(asc(tankMixes.name));
	const rates = await mixProducts(mixes.map((m) => m.id));
	return mixes.map((m) => ({
		...m,
		products: rates.filter((r) => r.tankMixId === m.id).map(({ tankMixId: _, ...r }) => r)
	}));
}

export async function getTankMix(actor: Actor, id: string): Promise<TankMixView | null> {
	if (!isId(id)) return null;
	const [mix] = await db
		.select({ id: tankMixes.id, name: tankMixes.name, carrierRateLPerM2: tankMixes.carrierRateLPerM2, notes: tankMixes.notes })
		.from(tankMixes)
		.where(and(eq(tankMixes.id, id), eq(tankMixes.farmId, actor.farm.id)));
	if (!mix) return null;
	const rates = await mixProducts([id]);
	return { ...mix, products: rates.map(({ tankMixId: _, ...r }) => r) };
}

/** Every product of the mix must be this farm's; one from elsewhere is "not found", never used. */
async function foreignProduct(actor: Actor, input: TankMixInput): Promise<Outcome<never> | null> {
	const ids = input.products.map((p) => p.productId);
	if (ids.length === 0) return null;
	if (!ids.every(isId)) return { ok: false, status: 404, field: 'products', message: 'One of the products is not in this farm’s catalogue.' };
	const found = await db
		.select({ id: products.id })
		.from(products)
		.where(and(inArray(products.id, ids), eq(products.farmId, actor.farm.id)));
	if (found.length === new Set(ids).size) return null;
	return { ok: false, status: 404, field: 'products', message: 'One of the products is not in this farm’s catalogue.' };
}

function mixValues(input: TankMixInput) {
	return { name: input.name.trim(), carrierRateLPerM2: input.carrierRateLPerM2, notes: input.notes?.trim() || null };
}

export async function createTankMix(actor: Actor, input: TankMixInput): Promise<Outcome<TankMixView>> {
	requireEdit(actor);
	assertTankMix(input);
	if (await nameTaken(tankMixes, actor, input.name)) return taken('tank mix', input.name);
	const foreign = await foreignProduct(actor, input);
	if (foreign) return foreign;
	const values = mixValues(input);
	const id = await db.transaction(async (tx) => {
		const [mix] = await tx
			.insert(tankMixes)
			.values({ ...values, farmId: actor.farm.id })
			.returning({ id: tankMixes.id });
		if (input.products.length > 0) {
			await tx.insert(tankMixProducts).values(input.products.map((p) => ({ tankMixId: mix.id, ...p })));
		}
		return mix.id;
	});
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'tank_mix.created',
		targetType: 'tank_mix',
		targetId: id,
		detail: { ...values, products: input.products }
	});
	return { ok: true, value: (await getTankMix(actor, id))! };
}

export async function updateTankMix(actor: Actor, id: string, input: TankMixInput): Promise<Outcome<TankMixView>> {
	requireEdit(actor);
	assertTankMix(input);
	const before = await getTankMix(actor, id);
	if (!before) return notFound('tank mix');
	if (await nameTaken(tankMixes, actor, input.name, id)) return taken('tank mix', input.name);
	const foreign = await foreignProduct(actor, input);
	if (foreign) return foreign;
	const values = mixValues(input);
	await db.transaction(async (tx) => {
		await tx
			.update(tankMixes)
			.set(values)
			.where(and(eq(tankMixes.id, id), eq(tankMixes.farmId, actor.farm.id)));
		await tx.delete(tankMixProducts).where(eq(tankMixProducts.tankMixId, id));
		if (input.products.length > 0) {
			await tx.insert(tankMixProducts).values(input.products.map((p) => ({ tankMixId: id, ...p })));
		}
	});
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'tank_mix.updated',
		targetType: 'tank_mix',
		targetId: id,
		detail: {
			before: { ...mixValues(before), products: before.products.map((p) => ({ productId: p.productId, ratePerM2: p.ratePerM2 })) },
			after: { ...values, products: input.products }
		}
	});
	return { ok: true, value: (await getTankMix(actor, id))! };
}

export async function deleteTankMix(actor: Actor, id: string): Promise<Outcome<{ name: string }>> {
	requireEdit(actor);
	const mix = await getTankMix(actor, id);
	if (!mix) return notFound('tank mix');
	const [used] = await db
		.select({ n: count() })
		.from(applications)
		.where(and(eq(applications.tankMixId, id), eq(applications.farmId, actor.farm.id)));
	if (used.n > 0) {
		return {
			ok: false,
			status: 409,
			message: `${mix.name} is the tank mix of ${used.n === 1 ? 'an application' : `${used.n} applications`}; their records and savings depend on it, so it cannot be deleted.`
		};
	}
	// tank_mix_products rows go with it (cascade); uploads keep their figures and lose the link.
	await db.delete(tankMixes).where(and(eq(tankMixes.id, id), eq(tankMixes.farmId, actor.farm.id)));
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'tank_mix.deleted',
		targetType: 'tank_mix',
		targetId: id,
		detail: { name: mix.name, carrierRateLPerM2: mix.carrierRateLPerM2, products: mix.products }
	});
	return { ok: true, value: { name: mix.name } };
}
