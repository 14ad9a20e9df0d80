// Unit conversions to SI for mapped log columns. Factors are exact or as printed in NIST SP 811
// (2008), Appendix B: 1 ft = 0.3048 m, 1 mph = 0.44704 m/s, 1 US gal = 3.785411784 L,
// 1 acre = 4046.8564224 m2, 1 psi = 6.894757E+03 Pa, 1 bar = 1E+05 Pa.

export const FOOT_M = 0.3048;
export const MPH_M_PER_S = 0.44704;
export const US_GALLON_L = 3.785411784;
export const ACRE_M2 = 4046.8564224;
export const PSI_PA = 6894.757;
export const BAR_PA = 1e5;
export const HECTARE_M2 = 1e4;

export type LengthUnit = 'm' | 'ft' | 'cm' | 'in';
export type SpeedUnit = 'km/h' | 'mph' | 'm/s';
export type RateUnit = 'L/ha' | 'gal/ac';
export type FlowUnit = 'L/min' | 'gal/min';
export type PressureUnit = 'bar' | 'psi' | 'kPa';

export const lengthToM: Record<LengthUnit, number> = { m: 1, ft: FOOT_M, cm: 0.01, in: FOOT_M / 12 };
export const speedToMPerS: Record<SpeedUnit, number> = { 'km/h': 1000 / 3600, mph: MPH_M_PER_S, 'm/s': 1 };
/** Volume per area to L/m2. */
export const rateToLPerM2: Record<RateUnit, number> = {
	'L/ha': 1 / HECTARE_M2,
	'gal/ac': US_GALLON_L / ACRE_M2
};
/** Volume per time to L/s. */
export const flowToLPerS: Record<FlowUnit, number> = { 'L/min': 1 / 60, 'gal/min': US_GALLON_L / 60 };
export const pressureToPa: Record<PressureUnit, number> = { bar: BAR_PA, psi: PSI_PA, kPa: 1000 };
