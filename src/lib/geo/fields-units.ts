// Field areas and lengths as people read them, in hectares and metres or acres and feet.
// 1 acre = 4046.8564224 m2 exactly (NIST SP 811, Appendix B); 1 ha = 10,000 m2 (SI).
export const M2_PER_ACRE = 4046.8564224;
export const M2_PER_HECTARE = 10_000;

export type UnitSystem = 'metric' | 'us';

/**
 * A field area in the user's units with two decimals: "12.35 ha" or "30.52 ac".
 * @example formatAreaM2(10_000, 'us') // '2.47 ac'
 */
export function formatAreaM2(areaM2: number, units: UnitSystem): string {
	const value = units === 'us' ? areaM2 / M2_PER_ACRE : areaM2 / M2_PER_HECTARE;
	const text = value.toLocaleString('en-US', { minimumFractionDigits: 2, maximumFractionDigits: 2 });
	return `${text} ${units === 'us' ? 'ac' : 'ha'}`;
}

/** A length in metres in the user's units: "10 m" or "32.8 ft" (1 ft = 0.3048 m, NIST SP 811). */
export function formatLengthM(lengthM: number, units: UnitSystem): string {
	if (units === 'us') return `${(lengthM / 0.3048).toLocaleString('en-US', { maximumFractionDigits: 1 })} ft`;
	return `${lengthM.toLocaleString('en-US', { maximumFractionDigits: 1 })} m`;
}
