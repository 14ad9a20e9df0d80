// Unit conversions. Everything stored or computed is SI (m, m2, L, kg, s, Pa); people enter and
// read metric or US customary. Factors are the exact definitions of NIST SP 811 (2008), Appendix B,
// and the 1959 yard and pound agreement: never rounded trade factors such as 3.786 L per gallon.

/** International inch and foot (1959), exact. */
export const M_PER_IN = 0.0254;
export const M_PER_FT = 0.3048;
/** US survey foot, 1200/3937 m: deprecated from 1 January 2023, but old deeds and records use it. */
export const M_PER_SURVEY_FT = 1200 / 3937;
/** 43,560 square (international) feet, exact. */
export const M2_PER_ACRE = 4046.8564224;
/** The same 43,560 square feet in survey feet: about 0.016 m2 (4 ppm) larger. */
export const M2_PER_SURVEY_ACRE = 43560 * M_PER_SURVEY_FT * M_PER_SURVEY_FT;
export const M2_PER_HA = 1e4;
/** US liquid gallon, 231 cubic inches, exact. */
export const L_PER_GAL = 3.785411784;
/** US fluid ounce, 1/128 gallon, exact. */
export const L_PER_FL_OZ = L_PER_GAL / 128;
/** Avoirdupois pound, exact; the ounce is 1/16 of it. */
export const KG_PER_LB = 0.45359237;
/** Pound-force per square inch: lbf = 0.45359237 kg x 9.80665 m/s2 (standard gravity), both exact. */
export const PA_PER_PSI = (KG_PER_LB * 9.80665) / (M_PER_IN * M_PER_IN);
export const PA_PER_BAR = 1e5;
/** Statute mile (5280 ft) per hour, exact. */
export const M_PER_S_PER_MPH = (5280 * M_PER_FT) / 3600;
export const M_PER_S_PER_KMH = 1000 / 3600;

/** The SI value of one of each unit, by quantity. SI units: m, m2, L, kg, L/m2, kg/m2, L/s, m/s, Pa. */
export const factors = {
	length: { m: 1, cm: 0.01, km: 1000, in: M_PER_IN, ft: M_PER_FT, mi: 5280 * M_PER_FT },
	area: { m2: 1, ha: M2_PER_HA, ac: M2_PER_ACRE },
	volume: { L: 1, mL: 1e-3, gal: L_PER_GAL, qt: L_PER_GAL / 4, pt: L_PER_GAL / 8, 'fl oz': L_PER_FL_OZ },
	mass: { kg: 1, g: 1e-3, lb: KG_PER_LB, oz: KG_PER_LB / 16 },
	volumePerArea: {
		'L/m2': 1,
		'L/ha': 1 / M2_PER_HA,
		'mL/ha': 1e-3 / M2_PER_HA,
		'gal/ac': L_PER_GAL / M2_PER_ACRE,
		'qt/ac': L_PER_GAL / 4 / M2_PER_ACRE,
		'pt/ac': L_PER_GAL / 8 / M2_PER_ACRE,
		'fl oz/ac': L_PER_FL_OZ / M2_PER_ACRE
	},
	massPerArea: {
		'kg/m2': 1,
		'kg/ha': 1 / M2_PER_HA,
		'g/ha': 1e-3 / M2_PER_HA,
		'lb/ac': KG_PER_LB / M2_PER_ACRE,
		'oz/ac': KG_PER_LB / 16 / M2_PER_ACRE
	},
	flow: { 'L/s': 1, 'L/min': 1 / 60, 'gal/min': L_PER_GAL / 60 },
	speed: { 'm/s': 1, 'km/h': M_PER_S_PER_KMH, mph: M_PER_S_PER_MPH },
	pressure: { Pa: 1, kPa: 1e3, bar: PA_PER_BAR, psi: PA_PER_PSI }
} as const;

export type Quantity = keyof typeof factors;
export type UnitOf<Q extends Quantity> = keyof (typeof factors)[Q] & string;

/** Every unit name this module knows, for checking user or file input. */
export function unitsOf<Q extends Quantity>(quantity: Q): UnitOf<Q>[] {
	return Object.keys(factors[quantity]) as UnitOf<Q>[];
}

export function isUnitOf<Q extends Quantity>(quantity: Q, unit: unknown): unit is UnitOf<Q> {
	return typeof unit === 'string' && Object.hasOwn(factors[quantity], unit);
}

function factor<Q extends Quantity>(quantity: Q, unit: UnitOf<Q>): number {
	const f = (factors[quantity] as Record<string, number>)[unit];
	if (f === undefined) throw new Error(`Unknown ${quantity} unit "${unit}"`);
	return f;
}

/**
 * A value in `unit` as SI.
 * @example toSi('volumePerArea', 15, 'gal/ac') // 0.0140309... L/m2 (140.309 L/ha)
 */
export function toSi<Q extends Quantity>(quantity: Q, value: number, unit: UnitOf<Q>): number {
	return value * factor(quantity, unit);
}

/**
 * An SI value in `unit`.
 * @example fromSi('pressure', 275790, 'psi') // 40.0
 */
export function fromSi<Q extends Quantity>(quantity: Q, valueSi: number, unit: UnitOf<Q>): number {
	return valueSi / factor(quantity, unit);
}

/**
 * From one unit to another of the same quantity.
 * @example convert('speed', 10, 'mph', 'km/h') // 16.09344
 */
export function convert<Q extends Quantity>(quantity: Q, value: number, from: UnitOf<Q>, to: UnitOf<Q>): number {
	return (value * factor(quantity, from)) / factor(quantity, to);
}

/**
 * Temperature is affine, not a factor: t/°C = (t/°F - 32)/1.8 (NIST SP 811 (2008), B.9, exact).
 * @example fahrenheitToCelsius(68) // 20
 */
export const fahrenheitToCelsius = (f: number) => (f - 32) / 1.8;
export const celsiusToFahrenheit = (c: number) => c * 1.8 + 32;
export type TemperatureUnit = '°C' | '°F';

// Named shortcuts for the conversions the trade does every day.
export const lPerHaToLPerM2 = (lPerHa: number) => lPerHa / M2_PER_HA;
export const lPerM2ToLPerHa = (lPerM2: number) => lPerM2 * M2_PER_HA;
export const galPerAcToLPerM2 = (galPerAc: number) => toSi('volumePerArea', galPerAc, 'gal/ac');
export const lPerM2ToGalPerAc = (lPerM2: number) => fromSi('volumePerArea', lPerM2, 'gal/ac');
export const galPerAcToLPerHa = (galPerAc: number) => convert('volumePerArea', galPerAc, 'gal/ac', 'L/ha');
export const lPerHaToGalPerAc = (lPerHa: number) => convert('volumePerArea', lPerHa, 'L/ha', 'gal/ac');
export const lbPerAcToKgPerHa = (lbPerAc: number) => convert('massPerArea', lbPerAc, 'lb/ac', 'kg/ha');
export const kgPerHaToLbPerAc = (kgPerHa: number) => convert('massPerArea', kgPerHa, 'kg/ha', 'lb/ac');
export const lPerMinToLPerS = (lPerMin: number) => lPerMin / 60;
export const lPerSToLPerMin = (lPerS: number) => lPerS * 60;
export const galPerMinToLPerS = (galPerMin: number) => toSi('flow', galPerMin, 'gal/min');
export const lPerSToGalPerMin = (lPerS: number) => fromSi('flow', lPerS, 'gal/min');
export const kmhToMPerS = (kmh: number) => kmh * M_PER_S_PER_KMH;
export const mPerSToKmh = (mPerS: number) => mPerS / M_PER_S_PER_KMH;
export const mphToMPerS = (mph: number) => mph * M_PER_S_PER_MPH;
export const mPerSToMph = (mPerS: number) => mPerS / M_PER_S_PER_MPH;
export const barToPa = (bar: number) => bar * PA_PER_BAR;
export const paToBar = (pa: number) => pa / PA_PER_BAR;
export const psiToPa = (psi: number) => psi * PA_PER_PSI;
export const paToPsi = (pa: number) => pa / PA_PER_PSI;
