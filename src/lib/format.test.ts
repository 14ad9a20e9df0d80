import { describe, expect, test } from 'vitest';
import { toSi } from '$lib/compute/units';
import {
	formatAmount,
	formatArea,
	formatBoomWidth,
	formatCarrierRate,
	formatFlow,
	formatMoney,
	formatNozzleSpacing,
	formatNumber,
	formatPressure,
	formatPricePerUnit,
	formatProductRate,
	formatSpeed,
	formatVolume,
	inputValue,
	productRateUnits,
	productUnitName
} from './format';

// Expected strings are worked by hand from the exact NIST SP 811 factors (DOMAIN.md section 4).
describe('numbers', () => {
	test('four significant digits, never rounding the integer part, grouped in thousands', () => {
		expect(formatNumber(140.30934)).toBe('140.3');
		expect(formatNumber(36.576)).toBe('36.58');
		expect(formatNumber(1234567.891)).toBe('1,234,568');
		expect(formatNumber(0.03125)).toBe('0.03125');
		expect(formatNumber(15.000000000001)).toBe('15');
		expect(formatNumber(-2.5)).toBe('-2.5');
		expect(formatNumber(0)).toBe('0');
	});

	test('a missing value reads as a dash, never "NaN" or "0"', () => {
		for (const missing of [null, undefined, Number.NaN, Number.POSITIVE_INFINITY]) {
			expect(formatNumber(missing)).toBe('–');
			expect(formatArea(missing, 'metric')).toBe('–');
			expect(formatMoney(missing, 'USD')).toBe('–');
		}
	});
});

describe('metric and US customary (NIST SP 811)', () => {
	test('area: 160 acres = 64.75 ha', () => {
		const m2 = 160 * 4046.8564224;
		expect(formatArea(m2, 'us')).toBe('160 ac');
		expect(formatArea(m2, 'metric')).toBe('64.75 ha');
	});

	test('volume: 1600 gal = 6,057 L (6056.66 L)', () => {
		const l = 1600 * 3.785411784;
		expect(formatVolume(l, 'us')).toBe('1,600 gal');
		expect(formatVolume(l, 'metric')).toBe('6,057 L');
	});

	test('carrier rate: 15 GPA = 140.3 L/ha (DOMAIN.md check 8: 140.309)', () => {
		const lPerM2 = toSi('volumePerArea', 15, 'gal/ac');
		expect(formatCarrierRate(lPerM2, 'us')).toBe('15 gal/ac');
		expect(formatCarrierRate(lPerM2, 'metric')).toBe('140.3 L/ha');
	});

	test('boom: 120 ft = 36.58 m; nozzle spacing 10 in = 25.4 cm', () => {
		expect(formatBoomWidth(36.576, 'us')).toBe('120 ft');
		expect(formatBoomWidth(36.576, 'metric')).toBe('36.58 m');
		expect(formatNozzleSpacing(0.254, 'us')).toBe('10 in');
		expect(formatNozzleSpacing(0.254, 'metric')).toBe('25.4 cm');
	});

	test('speed 10 mph = 16.1 km/h; pressure 40 psi = 2.76 bar; flow 0.4 gal/min = 1.514 L/min', () => {
		expect(formatSpeed(4.4704, 'us')).toBe('10 mph');
		expect(formatSpeed(4.4704, 'metric')).toBe('16.1 km/h');
		const pa = toSi('pressure', 40, 'psi');
		expect(formatPressure(pa, 'us')).toBe('40 psi');
		expect(formatPressure(pa, 'metric')).toBe('2.76 bar');
		const lPerS = toSi('flow', 0.4, 'gal/min');
		expect(formatFlow(lPerS, 'us')).toBe('0.4 gal/min');
		expect(formatFlow(lPerS, 'metric')).toBe('1.514 L/min');
	});

	test('product amounts read as L or gal, kg or lb', () => {
		expect(formatAmount(3.785411784 * 20, 'L', 'us')).toBe('20 gal');
		expect(formatAmount(0.45359237 * 10.5, 'kg', 'us')).toBe('10.5 lb');
		expect(formatAmount(4.7627, 'kg', 'metric')).toBe('4.763 kg');
		expect(productUnitName('L', 'us')).toBe('gal');
		expect(productUnitName('kg', 'metric')).toBe('kg');
	});

	test('label rates: 1 qt/ac = 0.25 gal/ac (32 fl oz/ac) = 2.338 L/ha; 1 lb/ac = 1.121 kg/ha (check 12)', () => {
		const qtPerAc = toSi('volumePerArea', 1, 'qt/ac');
		expect(formatProductRate(qtPerAc, 'L', 'us')).toBe('0.25 gal/ac (32 fl oz/ac)');
		expect(formatProductRate(qtPerAc, 'L', 'metric')).toBe('2.338 L/ha');
		expect(formatProductRate(toSi('volumePerArea', 2, 'gal/ac'), 'L', 'us')).toBe('2 gal/ac');
		expect(formatProductRate(toSi('massPerArea', 1, 'lb/ac'), 'kg', 'metric')).toBe('1.121 kg/ha');
		expect(formatProductRate(toSi('massPerArea', 0.5, 'oz/ac'), 'kg', 'us')).toBe('0.03125 lb/ac (0.5 oz/ac)');
		expect(productRateUnits('L', 'us')[0]).toBe('gal/ac');
		expect(productRateUnits('kg', 'metric')).toEqual(['kg/ha', 'g/ha']);
	});
});

describe('money (ISO 4217 minor units, ECMA-402 currency style)', () => {
	test('the farm’s currency with its own decimals', () => {
		expect(formatMoney(1234.5, 'USD')).toBe('$1,234.50');
		expect(formatMoney(1234.5, 'EUR')).toBe('€1,234.50');
		expect(formatMoney(1234.5, 'JPY')).toBe('¥1,235');
		expect(formatMoney(99.999, 'AUD')).toBe('A$100.00');
	});

	test('a price per L reads per gallon in US units: $10/L = $37.85/gal; $10/kg = $4.54/lb', () => {
		expect(formatPricePerUnit(10, 'USD', 'L', 'metric')).toBe('$10.00/L');
		expect(formatPricePerUnit(10, 'USD', 'L', 'us')).toBe('$37.85/gal');
		expect(formatPricePerUnit(10, 'USD', 'kg', 'us')).toBe('$4.54/lb');
		expect(formatPricePerUnit(null, 'USD', 'kg', 'us')).toBe('–');
	});
});

describe('form values', () => {
	test('a stored SI value goes back into a form as the number that was typed', () => {
		expect(inputValue('length', 36.576, 'ft')).toBe('120');
		expect(inputValue('length', 0.254, 'in')).toBe('10');
		expect(inputValue('volumePerArea', toSi('volumePerArea', 15, 'gal/ac'), 'gal/ac')).toBe('15');
		expect(inputValue('volumePerArea', toSi('volumePerArea', 15, 'gal/ac'), 'L/ha')).toBe('140.309343') // 56.78117676 L / 0.40468564224 ha;
		expect(inputValue('pressure', null, 'psi')).toBe('');
	});
});
