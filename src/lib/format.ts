// Values as people read them, in their unit system. Input is always SI (m, m2, L, kg, L/m2,
// kg/m2, L/s, m/s, Pa); conversions come from $lib/compute/units (NIST SP 811). One fixed
// locale, so a page rendered on the server reads the same after hydration in any browser.
import { celsiusToFahrenheit, fromSi, toSi, type Quantity, type TemperatureUnit, type UnitOf } from '$lib/compute/units';

export type UnitSystem = 'metric' | 'us';
export type ProductUnit = 'L' | 'kg';

const locale = 'en-US';

/** The unit each kind of value is entered and shown in. */
export const unitsFor = {
	metric: {
		area: 'ha',
		volume: 'L',
		mass: 'kg',
		boomWidth: 'm',
		nozzleSpacing: 'cm',
		carrierRate: 'L/ha',
		liquidRate: 'L/ha',
		dryRate: 'kg/ha',
		flow: 'L/min',
		speed: 'km/h',
		pressure: 'bar',
		height: 'cm',
		temperature: '°C'
	},
	us: {
		area: 'ac',
		volume: 'gal',
		mass: 'lb',
		boomWidth: 'ft',
		nozzleSpacing: 'in',
		carrierRate: 'gal/ac',
		liquidRate: 'gal/ac',
		dryRate: 'lb/ac',
		flow: 'gal/min',
		speed: 'mph',
		pressure: 'psi',
		height: 'in',
		temperature: '°F'
	}
} as const satisfies Record<
	UnitSystem,
	{
		area: UnitOf<'area'>;
		volume: UnitOf<'volume'>;
		mass: UnitOf<'mass'>;
		boomWidth: UnitOf<'length'>;
		nozzleSpacing: UnitOf<'length'>;
		carrierRate: UnitOf<'volumePerArea'>;
		liquidRate: UnitOf<'volumePerArea'>;
		dryRate: UnitOf<'massPerArea'>;
		flow: UnitOf<'flow'>;
		speed: UnitOf<'speed'>;
		pressure: UnitOf<'pressure'>;
		height: UnitOf<'length'>;
		temperature: TemperatureUnit;
	}
>;

/** Units a label rate may be typed in (labels use all of these); the first is the one shown. */
export function productRateUnits(unit: ProductUnit, system: UnitSystem): string[] {
	if (unit === 'L') return system === 'us' ? ['gal/ac', 'qt/ac', 'pt/ac', 'fl oz/ac'] : ['L/ha', 'mL/ha'];
	return system === 'us' ? ['lb/ac', 'oz/ac'] : ['kg/ha', 'g/ha'];
}

/** The quantity a product's rate per area belongs to. */
export function rateQuantity(unit: ProductUnit): 'volumePerArea' | 'massPerArea' {
	return unit === 'L' ? 'volumePerArea' : 'massPerArea';
}

/**
 * A number with about `significant` significant digits, never rounding the integer part, at
 * most `maxDecimals` decimals, thousands grouped: 140.309 -> "140.3", 36.576 -> "36.58".
 */
export function formatNumber(value: number | null | undefined, significant = 4, maxDecimals = 6): string {
	if (value === null || value === undefined || !Number.isFinite(value)) return '–';
	if (value === 0) return '0';
	const magnitude = Math.floor(Math.log10(Math.abs(value)));
	const decimals = Math.min(maxDecimals, Math.max(0, significant - 1 - magnitude));
	return new Intl.NumberFormat(locale, { maximumFractionDigits: decimals }).format(value);
}

/** An SI value in a named unit, with the unit: "140.3 L/ha". */
export function formatIn<Q extends Quantity>(quantity: Q, valueSi: number | null | undefined, unit: UnitOf<Q>, significant = 4): string {
	if (valueSi === null || valueSi === undefined || !Number.isFinite(valueSi)) return '–';
	return `${formatNumber(fromSi(quantity, valueSi, unit), significant)} ${unit}`;
}

export const formatArea = (m2: number | null | undefined, system: UnitSystem) => formatIn('area', m2, unitsFor[system].area);
export const formatVolume = (l: number | null | undefined, system: UnitSystem) => formatIn('volume', l, unitsFor[system].volume);
export const formatMass = (kg: number | null | undefined, system: UnitSystem) => formatIn('mass', kg, unitsFor[system].mass);
export const formatBoomWidth = (m: number | null | undefined, system: UnitSystem) => formatIn('length', m, unitsFor[system].boomWidth);
export const formatNozzleSpacing = (m: number | null | undefined, system: UnitSystem) =>
	formatIn('length', m, unitsFor[system].nozzleSpacing);
export const formatCarrierRate = (lPerM2: number | null | undefined, system: UnitSystem) =>
	formatIn('volumePerArea', lPerM2, unitsFor[system].carrierRate);
export const formatFlow = (lPerS: number | null | undefined, system: UnitSystem) => formatIn('flow', lPerS, unitsFor[system].flow);
export const formatSpeed = (mPerS: number | null | undefined, system: UnitSystem) => formatIn('speed', mPerS, unitsFor[system].speed, 3);
export const formatPressure = (pa: number | null | undefined, system: UnitSystem) => formatIn('pressure', pa, unitsFor[system].pressure, 3);

export const formatHeight = (m: number | null | undefined, system: UnitSystem) => formatIn('length', m, unitsFor[system].height, 3);

/** An air temperature (°C) in the user's unit: "18 °C", "64.4 °F". */
export function formatTemperature(celsius: number | null | undefined, system: UnitSystem): string {
	if (celsius === null || celsius === undefined || !Number.isFinite(celsius)) return '–';
	const unit = unitsFor[system].temperature;
	return `${formatNumber(unit === '°F' ? celsiusToFahrenheit(celsius) : celsius, 3, 1)} ${unit}`;
}

/** An amount of product (L or kg) as L or gal, kg or lb. */
export function formatAmount(amount: number | null | undefined, unit: ProductUnit, system: UnitSystem): string {
	return unit === 'L' ? formatVolume(amount, system) : formatMass(amount, system);
}

/**
 * A label rate (product unit per m2). In US units a rate under one gallon or pound per acre
 * also reads in the fluid ounces or ounces labels print: "0.25 gal/ac (32 fl oz/ac)".
 */
export function formatProductRate(ratePerM2: number | null | undefined, unit: ProductUnit, system: UnitSystem): string {
	if (unit === 'L') {
		const main = formatIn('volumePerArea', ratePerM2, unitsFor[system].liquidRate);
		if (system === 'us' && ratePerM2 && fromSi('volumePerArea', ratePerM2, 'gal/ac') < 1) {
			return `${main} (${formatIn('volumePerArea', ratePerM2, 'fl oz/ac', 3)})`;
		}
		return main;
	}
	const main = formatIn('massPerArea', ratePerM2, unitsFor[system].dryRate);
	if (system === 'us' && ratePerM2 && fromSi('massPerArea', ratePerM2, 'lb/ac') < 1) {
		return `${main} (${formatIn('massPerArea', ratePerM2, 'oz/ac', 3)})`;
	}
	return main;
}

/** Money in the farm's currency (ISO 4217), with that currency's usual decimals. */
export function formatMoney(amount: number | null | undefined, currency: string): string {
	if (amount === null || amount === undefined || !Number.isFinite(amount)) return '–';
	return new Intl.NumberFormat(locale, { style: 'currency', currency }).format(amount);
}

/** A price per L or kg, shown per L or gal, kg or lb: "$47.32/gal". */
export function formatPricePerUnit(
	pricePerUnit: number | null | undefined,
	currency: string,
	unit: ProductUnit,
	system: UnitSystem
): string {
	if (pricePerUnit === null || pricePerUnit === undefined || !Number.isFinite(pricePerUnit)) return '–';
	const shownUnit = unit === 'L' ? unitsFor[system].volume : unitsFor[system].mass;
	// Price per L (or kg) times the L (or kg) in one shown unit.
	const perShown = pricePerUnit * (unit === 'L' ? toSi('volume', 1, unitsFor[system].volume) : toSi('mass', 1, unitsFor[system].mass));
	return `${formatMoney(perShown, currency)}/${shownUnit}`;
}

/** The name of a product's unit in the user's system: L or gal, kg or lb. */
export function productUnitName(unit: ProductUnit, system: UnitSystem): string {
	return unit === 'L' ? unitsFor[system].volume : unitsFor[system].mass;
}

/**
 * An SI value as a form field's starting text in `unit`: plain digits, no grouping, nine
 * significant digits, so 36.576 m shows as "120" ft rather than "119.99999999999999".
 */
export function inputValue<Q extends Quantity>(quantity: Q, valueSi: number | null | undefined, unit: UnitOf<Q>): string {
	if (valueSi === null || valueSi === undefined || !Number.isFinite(valueSi)) return '';
	return String(Number(fromSi(quantity, valueSi, unit).toPrecision(9)));
}
