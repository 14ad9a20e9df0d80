// Catalogue forms: the values people typed, in their own units, turned into SI inputs for
// $lib/server/catalogue, or a message per field saying what is wrong in the same units.
import { isUnitOf, toSi, type Quantity, type UnitOf } from '$lib/compute/units';
import { formatIn, formatNumber, productRateUnits, rateQuantity, unitsFor, type ProductUnit, type UnitSystem } from '$lib/format';
import type { MachineInput, ProductInput, TankMixInput } from '$lib/server/catalogue';

export type Values = Record<string, string | string[]>;
export type Parsed<T> =
	| { ok: true; value: T; warnings: string[]; values: Values }
	| { ok: false; problems: Record<string, string>; values: Values };

// Plausible ranges, SI. Common practice, no source, except where noted: wide enough for any
// field sprayer, narrow enough to catch a value typed in the wrong unit.
export const limits = {
	boomWidthM: [1, 60],
	nozzleCount: [1, 1000],
	nozzleSpacingM: [0.05, 1],
	nozzleFlowLPerS: [0.05 / 60, 20 / 60],
	referencePressurePa: [0.5e5, 10e5],
	/** Quality limits: 2 to 60 km/h; boom 10 cm to 3 m with 0.5 cm to 1 m either side; 0.2 to 20 bar. */
	maxSpeedMPerS: [2 / 3.6, 60 / 3.6],
	targetHeightM: [0.1, 3],
	heightToleranceM: [0.005, 1],
	pressureLimitPa: [0.2e5, 20e5],
	/** Boom width and nozzle count x spacing must agree this closely (relative). */
	boomMismatch: 0.01,
	carrierRateLPerM2: [5e-4, 500e-4],
	/** Outside this carrier rate range the form saves but warns. */
	usualCarrierRateLPerM2: [20e-4, 200e-4],
	/** Per product, in its unit per m2: 0.001 to 100 L/ha or kg/ha. */
	productRatePerM2: [1e-7, 100e-4],
	pricePerUnit: [0, 100_000],
	nameLength: 120,
	registrationLength: 60,
	notesLength: 2000
} as const;

function text(form: FormData, key: string): string {
	const value = form.get(key);
	return typeof value === 'string' ? value.trim() : '';
}

function texts(form: FormData, key: string): string[] {
	return form.getAll(key).map((v) => (typeof v === 'string' ? v.trim() : ''));
}

/** A typed number; '' is null. Browsers send a point from type="number" fields whatever the locale. */
function number(raw: string): number | null | 'invalid' {
	if (raw === '') return null;
	const n = Number(raw);
	return Number.isFinite(n) ? n : 'invalid';
}

const percent = (x: number) => `${formatNumber(x * 100, 2, 1)}%`;

class Checker {
	problems: Record<string, string> = {};
	warnings: string[] = [];

	name(raw: string, key = 'name', max: number = limits.nameLength): string {
		if (!raw) this.problems[key] = 'Give it a name.';
		else if (raw.length > max) this.problems[key] = `Use at most ${max} characters (now ${raw.length}).`;
		return raw;
	}

	/**
	 * A number typed in `unit`, as SI; null when empty and optional. Range messages are given in
	 * the unit the person typed.
	 */
	quantity<Q extends Quantity>(
		key: string,
		raw: string,
		quantity: Q,
		unit: UnitOf<Q>,
		range: readonly [number, number],
		options: { required?: boolean; integer?: boolean; label: string }
	): number | null {
		const n = number(raw);
		if (n === null) {
			if (options.required) this.problems[key] = `Enter the ${options.label}.`;
			return null;
		}
		if (n === 'invalid') {
			this.problems[key] = `The ${options.label} must be a number, like 12.5.`;
			return null;
		}
		if (options.integer && !Number.isInteger(n)) {
			this.problems[key] = `The ${options.label} must be a whole number.`;
			return null;
		}
		const si = toSi(quantity, n, unit);
		if (!(si > 0)) {
			this.problems[key] = `The ${options.label} must be more than 0.`;
			return null;
		}
		// A relative tolerance, so a limit typed exactly in the other unit system is inside.
		if (si < range[0] * (1 - 1e-9) || si > range[1] * (1 + 1e-9)) {
			this.problems[key] =
				`The ${options.label} must be between ${formatIn(quantity, range[0], unit, 3)} and ${formatIn(quantity, range[1], unit, 3)}.`;
			return null;
		}
		return si;
	}

	count(key: string, raw: string, range: readonly [number, number], options: { required?: boolean; label: string }): number | null {
		const n = number(raw);
		if (n === null) {
			if (options.required) this.problems[key] = `Enter the ${options.label}.`;
			return null;
		}
		if (n === 'invalid' || !Number.isInteger(n)) {
			this.problems[key] = `The ${options.label} must be a whole number, like 12.`;
			return null;
		}
		if (n < range[0] || n > range[1]) {
			this.problems[key] = `The ${options.label} must be between ${range[0]} and ${range[1]}.`;
			return null;
		}
		return n;
	}

	get ok() {
		return Object.keys(this.problems).length === 0;
	}
}

export function parseMachine(form: FormData, system: UnitSystem): Parsed<MachineInput> {
	const units = unitsFor[system];
	const values = {
		name: text(form, 'name'),
		boomWidth: text(form, 'boomWidth'),
		nozzleCount: text(form, 'nozzleCount'),
		nozzleSpacing: text(form, 'nozzleSpacing'),
		nozzlesPerSensor: text(form, 'nozzlesPerSensor'),
		nozzleFlow: text(form, 'nozzleFlow'),
		referencePressure: text(form, 'referencePressure'),
		maxSpeed: text(form, 'maxSpeed'),
		targetHeight: text(form, 'targetHeight'),
		heightTolerance: text(form, 'heightTolerance'),
		pressureMin: text(form, 'pressureMin'),
		pressureMax: text(form, 'pressureMax')
	};
	const c = new Checker();
	const name = c.name(values.name);
	const boomWidthM = c.quantity('boomWidth', values.boomWidth, 'length', units.boomWidth, limits.boomWidthM, {
		required: true,
		label: 'boom width'
	});
	const nozzleCount = c.count('nozzleCount', values.nozzleCount, limits.nozzleCount, { required: true, label: 'nozzle count' });
	const nozzleSpacingM = c.quantity('nozzleSpacing', values.nozzleSpacing, 'length', units.nozzleSpacing, limits.nozzleSpacingM, {
		required: true,
		label: 'nozzle spacing'
	});
	const nozzlesPerSensor =
		c.count('nozzlesPerSensor', values.nozzlesPerSensor, [1, nozzleCount ?? limits.nozzleCount[1]], {
			label: 'number of nozzles per sensor'
		}) ?? 1;
	const nozzleFlowLPerS = c.quantity('nozzleFlow', values.nozzleFlow, 'flow', units.flow, limits.nozzleFlowLPerS, {
		label: 'nozzle flow'
	});
	const referencePressurePa = c.quantity('referencePressure', values.referencePressure, 'pressure', units.pressure, limits.referencePressurePa, {
		label: 'reference pressure'
	});
	// The flow only means something at a stated pressure (flow grows with the square root of pressure).
	if (values.nozzleFlow && !values.referencePressure && !c.problems.nozzleFlow) {
		c.problems.referencePressure = 'Give the pressure the nozzle flow was measured at, or leave both empty.';
	}
	if (values.referencePressure && !values.nozzleFlow && !c.problems.referencePressure) {
		c.problems.nozzleFlow = 'Give the nozzle flow at this pressure, or leave both empty.';
	}
	const maxSpeedMPerS = c.quantity('maxSpeed', values.maxSpeed, 'speed', units.speed, limits.maxSpeedMPerS, { label: 'maximum speed' });
	const targetHeightM = c.quantity('targetHeight', values.targetHeight, 'length', units.height, limits.targetHeightM, { label: 'target boom height' });
	const heightToleranceM = c.quantity('heightTolerance', values.heightTolerance, 'length', units.height, limits.heightToleranceM, {
		label: 'height tolerance'
	});
	const pressureMinPa = c.quantity('pressureMin', values.pressureMin, 'pressure', units.pressure, limits.pressureLimitPa, { label: 'lowest pressure' });
	const pressureMaxPa = c.quantity('pressureMax', values.pressureMax, 'pressure', units.pressure, limits.pressureLimitPa, { label: 'highest pressure' });
	// A target height means nothing without its band, and a band nothing without a target.
	if (values.targetHeight && !values.heightTolerance && !c.problems.targetHeight) {
		c.problems.heightTolerance = 'Give how far above or below the target height is still fine, or leave both empty.';
	}
	if (values.heightTolerance && !values.targetHeight && !c.problems.heightTolerance) {
		c.problems.targetHeight = 'Give the target boom height for this tolerance, or leave both empty.';
	}
	if (targetHeightM !== null && heightToleranceM !== null && heightToleranceM >= targetHeightM) {
		c.problems.heightTolerance = `The tolerance must be less than the target height (${formatIn('length', targetHeightM, units.height)}).`;
	}
	if (pressureMinPa !== null && pressureMaxPa !== null && pressureMinPa >= pressureMaxPa) {
		c.problems.pressureMax = `The highest pressure must be above the lowest (${formatIn('pressure', pressureMinPa, units.pressure)}).`;
	}
	if (boomWidthM !== null && nozzleCount !== null && nozzleSpacingM !== null) {
		const nozzlesM = nozzleCount * nozzleSpacingM;
		const apart = Math.abs(nozzlesM - boomWidthM) / boomWidthM;
		if (apart > limits.boomMismatch) {
			c.problems.boomWidth =
				`${nozzleCount} nozzles × ${formatIn('length', nozzleSpacingM, units.nozzleSpacing)} = ${formatIn('length', nozzlesM, units.boomWidth)}, ` +
				`but the boom width is ${formatIn('length', boomWidthM, units.boomWidth)} (${percent(apart)} apart). ` +
				`They must agree within ${percent(limits.boomMismatch)}: check the width, the count and the spacing.`;
		}
	}
	if (!c.ok) return { ok: false, problems: c.problems, values };
	return {
		ok: true,
		values,
		warnings: c.warnings,
		value: {
			name,
			boomWidthM: boomWidthM!,
			nozzleCount: nozzleCount!,
			nozzleSpacingM: nozzleSpacingM!,
			nozzlesPerSensor,
			nozzleFlowLPerS,
			referencePressurePa,
			maxSpeedMPerS,
			targetHeightM,
			heightToleranceM,
			pressureMinPa,
			pressureMaxPa
		}
	};
}

export function parseProduct(form: FormData, system: UnitSystem, canSetPrice: boolean): Parsed<ProductInput> {
	const values: Record<string, string> = {
		name: text(form, 'name'),
		registrationNumber: text(form, 'registrationNumber'),
		unit: text(form, 'unit')
	};
	if (canSetPrice) values.price = text(form, 'price');
	const c = new Checker();
	const name = c.name(values.name);
	if (values.registrationNumber.length > limits.registrationLength) {
		c.problems.registrationNumber = `Use at most ${limits.registrationLength} characters.`;
	}
	const unit = values.unit === 'L' || values.unit === 'kg' ? (values.unit as ProductUnit) : null;
	if (!unit) c.problems.unit = 'Choose liquid (sold by volume) or dry (sold by weight).';
	let pricePerUnit: number | null = null;
	if (canSetPrice && values.price !== '') {
		const n = number(values.price);
		if (n === null || n === 'invalid') c.problems.price = 'The price must be a number, like 12.50.';
		else if (unit) {
			// Typed per gal or lb in US units; stored per L or kg.
			const perSi = unit === 'L' ? toSi('volume', 1, unitsFor[system].volume) : toSi('mass', 1, unitsFor[system].mass);
			const price = n / perSi;
			if (price < limits.pricePerUnit[0]) c.problems.price = 'The price cannot be negative.';
			else if (price > limits.pricePerUnit[1]) c.problems.price = 'That price is too high to be right; check the unit.';
			else pricePerUnit = price;
		}
	}
	if (!c.ok || !unit) return { ok: false, problems: c.problems, values };
	return {
		ok: true,
		values,
		warnings: c.warnings,
		value: { name, registrationNumber: values.registrationNumber || null, unit, pricePerUnit }
	};
}

export function parseTankMix(
	form: FormData,
	system: UnitSystem,
	catalogue: { id: string; name: string; unit: ProductUnit }[]
): Parsed<TankMixInput> {
	const units = unitsFor[system];
	const productIds = texts(form, 'productId');
	const rates = texts(form, 'rate');
	const rateUnits = texts(form, 'rateUnit');
	const values: Values = {
		name: text(form, 'name'),
		carrierRate: text(form, 'carrierRate'),
		notes: text(form, 'notes'),
		productId: productIds,
		rate: rates,
		rateUnit: rateUnits
	};
	const c = new Checker();
	const name = c.name(values.name as string);
	const notes = values.notes as string;
	if (notes.length > limits.notesLength) c.problems.notes = `Use at most ${limits.notesLength} characters (now ${notes.length}).`;
	const carrierRateLPerM2 = c.quantity('carrierRate', values.carrierRate as string, 'volumePerArea', units.carrierRate, limits.carrierRateLPerM2, {
		required: true,
		label: 'carrier rate'
	});
	if (carrierRateLPerM2 !== null) {
		const [low, high] = limits.usualCarrierRateLPerM2;
		if (carrierRateLPerM2 < low || carrierRateLPerM2 > high) {
			c.warnings.push(
				`A carrier rate of ${formatIn('volumePerArea', carrierRateLPerM2, units.carrierRate)} is outside the usual ` +
					`${formatIn('volumePerArea', low, units.carrierRate, 3)} to ${formatIn('volumePerArea', high, units.carrierRate, 3)}: check it against the label.`
			);
		}
	}

	const byId = new Map(catalogue.map((p) => [p.id, p]));
	const chosen: TankMixInput['products'] = [];
	const rows = Math.max(productIds.length, rates.length);
	for (let i = 0; i < rows; i++) {
		const productId = productIds[i] ?? '';
		const raw = rates[i] ?? '';
		if (!productId && !raw) continue; // an empty row
		const product = byId.get(productId);
		if (!product) {
			c.problems[`product-${i}`] = productId ? 'Choose a product from this farm’s catalogue.' : 'Choose the product for this rate.';
			continue;
		}
		if (chosen.some((p) => p.productId === productId)) {
			c.problems[`product-${i}`] = `${product.name} is listed twice; give it one rate.`;
			continue;
		}
		const quantity = rateQuantity(product.unit);
		const allowed = productRateUnits(product.unit, system);
		const unit = rateUnits[i] || allowed[0];
		if (!isUnitOf(quantity, unit)) {
			c.problems[`rate-${i}`] =
				`${product.name} is ${product.unit === 'L' ? 'a liquid' : 'dry'}: give its rate in ${allowed.join(', ')}.`;
			continue;
		}
		const ratePerM2 = c.quantity(`rate-${i}`, raw, quantity as 'volumePerArea', unit as UnitOf<'volumePerArea'>, limits.productRatePerM2, {
			required: true,
			label: `label rate of ${product.name}`
		});
		if (ratePerM2 === null) continue;
		if (product.unit === 'L' && carrierRateLPerM2 !== null && ratePerM2 > carrierRateLPerM2) {
			c.problems[`rate-${i}`] =
				`${formatIn('volumePerArea', ratePerM2, units.liquidRate)} of ${product.name} is more than the whole carrier rate ` +
				`(${formatIn('volumePerArea', carrierRateLPerM2, units.carrierRate)}): check both.`;
			continue;
		}
		chosen.push({ productId, ratePerM2 });
	}
	if (chosen.length === 0 && !Object.keys(c.problems).some((k) => k.startsWith('product-') || k.startsWith('rate-'))) {
		c.problems.products = 'Add at least one product with its label rate.';
	}
	if (!c.ok) return { ok: false, problems: c.problems, values };
	return {
		ok: true,
		values,
		warnings: c.warnings,
		value: { name, carrierRateLPerM2: carrierRateLPerM2!, notes: notes || null, products: chosen }
	};
}
