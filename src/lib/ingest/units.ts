// The units a log's columns may be mapped in, and their factors to SI, taken from the one table
// of NIST SP 811 factors in $lib/compute/units.
import { factors, L_PER_GAL, M2_PER_ACRE } from '../compute/units';

export const US_GALLON_L = L_PER_GAL;
export const ACRE_M2 = M2_PER_ACRE;

export type LengthUnit = 'm' | 'ft' | 'cm' | 'in';
export type SpeedUnit = 'km/h' | 'mph' | 'm/s';
export type RateUnit = 'L/ha' | 'gal/ac';
export type FlowUnit = 'L/min' | 'gal/min';
export type PressureUnit = 'bar' | 'psi' | 'kPa';

const pick = <U extends string>(table: Record<string, number>, units: U[]) =>
	Object.fromEntries(units.map((u) => [u, table[u]])) as Record<U, number>;

export const lengthToM = pick(factors.length, ['m', 'ft', 'cm', 'in'] as LengthUnit[]);
export const speedToMPerS = pick(factors.speed, ['km/h', 'mph', 'm/s'] as SpeedUnit[]);
/** Volume per area to L/m2. */
export const rateToLPerM2 = pick(factors.volumePerArea, ['L/ha', 'gal/ac'] as RateUnit[]);
/** Volume per time to L/s. */
export const flowToLPerS = pick(factors.flow, ['L/min', 'gal/min'] as FlowUnit[]);
export const pressureToPa = pick(factors.pressure, ['bar', 'psi', 'kPa'] as PressureUnit[]);
