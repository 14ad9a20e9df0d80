import { describe, expect, test } from 'vitest';
import {
	L_PER_FL_OZ,
	L_PER_GAL,
	M2_PER_ACRE,
	M2_PER_SURVEY_ACRE,
	PA_PER_PSI,
	barToPa,
	convert,
	factors,
	fromSi,
	galPerAcToLPerHa,
	galPerAcToLPerM2,
	galPerMinToLPerS,
	isUnitOf,
	kgPerHaToLbPerAc,
	kmhToMPerS,
	lPerHaToGalPerAc,
	lPerHaToLPerM2,
	lPerM2ToGalPerAc,
	lPerM2ToLPerHa,
	lPerMinToLPerS,
	lPerSToGalPerMin,
	lPerSToLPerMin,
	lbPerAcToKgPerHa,
	mPerSToKmh,
	mPerSToMph,
	mphToMPerS,
	paToBar,
	paToPsi,
	psiToPa,
	toSi,
	unitsOf,
	type Quantity
} from './units';

// Check values 7-13 of DOMAIN.md; exact definitions from NIST SP 811 (2008) Appendix B.
describe('exact definitions (NIST SP 811)', () => {
	test('check 7: one acre is 43,560 international square feet = 4046.8564224 m2 (NIST SP 811)', () => {
		expect(43560 * 0.3048 * 0.3048).toBeCloseTo(4046.8564224, 9);
		expect(toSi('area', 1, 'ac')).toBeCloseTo(4046.8564224, 9);
		expect(M2_PER_ACRE).toBe(4046.8564224);
	});

	test('check 9: US gallon = 231 in3 = 3.785411784 L; fluid ounce = 29.5735295625 mL (NIST SP 811)', () => {
		// 231 cubic inches at 0.0254 m per inch, 1000 L per m3: the definition, not the table value.
		expect(231 * 0.0254 ** 3 * 1000).toBeCloseTo(3.785411784, 12);
		expect(L_PER_GAL).toBe(3.785411784);
		expect(L_PER_FL_OZ * 1000).toBeCloseTo(29.5735295625, 10);
		expect(convert('volume', 128, 'fl oz', 'gal')).toBeCloseTo(1, 12);
		expect(convert('volume', 1, 'gal', 'qt')).toBeCloseTo(4, 12);
	});

	test('check 10: 40 psi = 275.790 kPa = 2.75790 bar; 1 psi = 6.894757 kPa (NIST SP 811)', () => {
		expect(PA_PER_PSI / 1000).toBeCloseTo(6.894757, 6);
		expect(psiToPa(40) / 1000).toBeCloseTo(275.79, 2);
		expect(paToBar(psiToPa(40))).toBeCloseTo(2.7579, 5);
		expect(convert('pressure', 40, 'psi', 'bar')).toBeCloseTo(2.7579, 5);
		expect(barToPa(1)).toBe(100_000);
		expect(paToPsi(barToPa(1))).toBeCloseTo(14.50377, 5); // NIST SP 811: 1 bar = 14.50377 psi
	});

	test('check 11: 10 mph = 16.09344 km/h exactly (NIST SP 811)', () => {
		expect(convert('speed', 10, 'mph', 'km/h')).toBeCloseTo(16.09344, 10);
		expect(mphToMPerS(1)).toBeCloseTo(0.44704, 12);
		expect(mPerSToKmh(mphToMPerS(10))).toBeCloseTo(16.09344, 10);
		expect(mPerSToMph(kmhToMPerS(16.09344))).toBeCloseTo(10, 10);
	});

	test('check 12: 1 lb/acre = 1.120851 kg/ha (NIST SP 811)', () => {
		expect(lbPerAcToKgPerHa(1)).toBeCloseTo(1.120851, 6);
		expect(kgPerHaToLbPerAc(1.120851)).toBeCloseTo(1, 6);
		expect(toSi('massPerArea', 1, 'lb/ac')).toBeCloseTo(0.45359237 / 4046.8564224, 15);
	});

	test('check 13: the survey acre is 0.016187 m2 (4.0 ppm) larger than the international acre (NIST/NOAA notice, R44)', () => {
		const differenceM2 = M2_PER_SURVEY_ACRE - M2_PER_ACRE;
		expect(differenceM2).toBeCloseTo(0.016187, 6);
		expect((differenceM2 / M2_PER_ACRE) * 1e6).toBeCloseTo(4.0, 1);
	});
});

describe('application rates', () => {
	test('check 8: 15 GPA = 140.309 L/ha; 1 GPA = 9.353956 L/ha; 1 L/ha = 0.106907 GPA (NIST SP 811 factors)', () => {
		expect(galPerAcToLPerHa(15)).toBeCloseTo(140.309, 3);
		expect(galPerAcToLPerHa(1)).toBeCloseTo(9.353956, 6);
		expect(lPerHaToGalPerAc(1)).toBeCloseTo(0.106907, 6);
		expect(lPerM2ToLPerHa(galPerAcToLPerM2(15))).toBeCloseTo(140.309, 3);
		expect(lPerM2ToGalPerAc(lPerHaToLPerM2(140.309))).toBeCloseTo(15, 4);
	});

	test('1 fl oz/acre = 73.07778 mL/ha and 1 ha = 2.471054 acres (DOMAIN.md section 4, derived from NIST SP 811)', () => {
		expect(convert('volumePerArea', 1, 'fl oz/ac', 'mL/ha')).toBeCloseTo(73.07778, 5);
		expect(convert('area', 1, 'ha', 'ac')).toBeCloseTo(2.471054, 6);
	});

	test('check 1: 0.4 GPM at 6 mph on 20 in spacing is 19.8 GPA (UF/IFAS WG013 formula GPA = GPM x 5940 / (MPH x W))', () => {
		const lPerM2 = galPerMinToLPerS(0.4) / (mphToMPerS(6) * toSi('length', 20, 'in'));
		expect(lPerM2ToGalPerAc(lPerM2)).toBeCloseTo(19.8, 10);
	});

	test('check 3: 1.3 L/min at 7.8 km/h on 0.5 m spacing is 200 L/ha (Farm Ireland formula L/ha = L/min x 600 / (km/h x m))', () => {
		const lPerM2 = lPerMinToLPerS(1.3) / (kmhToMPerS(7.8) * 0.5);
		expect(lPerM2ToLPerHa(lPerM2)).toBeCloseTo(200, 10);
	});

	test('check 5: an 800 gal tank at 10 GPA covers 80 acres and takes 20 gal of a 1 qt/acre product (SDSU, Missouri G1272)', () => {
		const acresPerTank = fromSi('area', toSi('volume', 800, 'gal') / galPerAcToLPerM2(10), 'ac');
		expect(acresPerTank).toBeCloseTo(80, 10);
		const productL = toSi('volumePerArea', 1, 'qt/ac') * toSi('area', acresPerTank, 'ac');
		expect(fromSi('volume', productL, 'gal')).toBeCloseTo(20, 10);
	});

	test('flows: 1 gal/min = 3.785411784 L/min (NIST SP 811)', () => {
		expect(lPerSToLPerMin(galPerMinToLPerS(1))).toBeCloseTo(3.785411784, 12);
		expect(lPerSToGalPerMin(lPerMinToLPerS(3.785411784))).toBeCloseTo(1, 12);
	});
});

describe('the unit tables', () => {
	test('every unit converts to SI and back to the same value', () => {
		for (const quantity of Object.keys(factors) as Quantity[]) {
			for (const unit of unitsOf(quantity)) {
				expect(fromSi(quantity, toSi(quantity, 123.456, unit), unit), `${quantity} ${unit}`).toBeCloseTo(123.456, 9);
			}
		}
	});

	test('an unknown unit is rejected by name, not turned into NaN', () => {
		expect(isUnitOf('speed', 'mph')).toBe(true);
		expect(isUnitOf('speed', 'knots')).toBe(false);
		expect(isUnitOf('speed', 'toString')).toBe(false);
		// @ts-expect-error: a unit of another quantity
		expect(() => toSi('speed', 1, 'psi')).toThrow('Unknown speed unit "psi"');
	});
});
