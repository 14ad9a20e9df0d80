import Papa from 'papaparse';
import { describe, expect, test } from 'vitest';
import type { SavingsRow } from '$lib/compute/savings-table';
import { amountIn, perShownArea, pricePerShownUnit, savingsCsv } from './csv';

const row = (over: Partial<SavingsRow>): SavingsRow => ({
	season: 2025,
	fieldId: 'f1',
	fieldName: 'North Flat',
	productId: 'p1',
	productName: 'Glyphosate 540 (demo)',
	unit: 'L',
	pricePerUnit: 6.4,
	applications: 1,
	coveredM2: 1_000_000,
	broadcastUnits: 150,
	appliedUnits: 18,
	savedUnits: 132,
	percentSaved: 88,
	broadcastCost: 960,
	appliedCost: 115.2,
	savedCost: 844.8,
	appliedCostPerM2: 115.2 / 1e6,
	savedCostPerM2: 844.8 / 1e6,
	...over
});

describe('savings CSV (RFC 4180)', () => {
	const rows = [
		row({}),
		row({ fieldName: 'Field "A", east', productName: 'Flumioxazin 51 WG (demo)', unit: 'kg', broadcastUnits: 0.84, appliedUnits: 0.42, savedUnits: 0.42, pricePerUnit: 118 }),
		row({ fieldName: '=HYPERLINK("x")', pricePerUnit: null, savedCost: null, appliedCost: null, broadcastCost: null, appliedCostPerM2: null, savedCostPerM2: null })
	];
	const text = savingsCsv(rows, 'metric', 'USD');

	test('records end in CRLF, including the last; no bare LF', () => {
		expect(text.endsWith('\r\n')).toBe(true);
		expect(text.split('\r\n')).toHaveLength(rows.length + 2);
		expect(text.replaceAll('\r\n', '')).not.toMatch(/[\r\n]/);
	});

	test('a field with a comma or quotes is quoted and its quotes doubled (RFC 4180 §2.6-2.7)', () => {
		expect(text).toContain('2025,"Field ""A"", east",Flumioxazin 51 WG (demo),');
	});

	test('a name that a spreadsheet would run as a formula is prefixed with a quote', () => {
		expect(text).toContain(`"'=HYPERLINK(""x"")"`);
	});

	test('every amount column names its unit; liquids and dry products get their own columns', () => {
		const [header, glyphosate, flumioxazin] = Papa.parse<string[]>(text.trim(), { newline: '\r\n' }).data;
		expect(header).toContain('Covered area (ha)');
		expect(header).toContain('Saved (L)');
		expect(header).toContain('Saved (kg)');
		expect(header).toContain('Saved (USD)');
		expect(header).toContain('Saved (USD/ha)');
		const at = (r: string[], name: string) => r[header.indexOf(name)];
		expect(at(glyphosate, 'Saved (L)')).toBe('132');
		expect(at(glyphosate, 'Saved (kg)')).toBe('');
		expect(at(flumioxazin, 'Saved (kg)')).toBe('0.42');
		expect(at(flumioxazin, 'Saved (L)')).toBe('');
		expect(at(glyphosate, 'Covered area (ha)')).toBe('100');
		expect(at(glyphosate, 'Saved (USD/ha)')).toBe('8.448');
		expect(at(glyphosate, 'Price (USD/L)')).toBe('6.4');
	});

	test('US units: gallons, pounds, acres, with NIST SP 811 factors', () => {
		const us = Papa.parse<string[]>(savingsCsv(rows, 'us', 'USD').trim(), { newline: '\r\n' }).data;
		const [header, glyphosate, flumioxazin] = us;
		const at = (r: string[], name: string) => Number(r[header.indexOf(name)]);
		// NIST SP 811 (2008) App. B.8: gallon [U.S.] = 3.785 412 E-03 m3; pound (avoirdupois) = 4.535 924 E-01 kg.
		expect(at(glyphosate, 'Saved (gal)')).toBeCloseTo(132 / 3.785412, 2);
		expect(at(flumioxazin, 'Saved (lb)')).toBeCloseTo(0.42 / 0.4535924, 3);
		// Acre: 43,560 international square feet (NIST SP 811 B.8 lists the survey acre, 4.046 873 E+03 m2,
		// 4 ppm larger; the international foot applies since 2023, 85 FR 62698): 100 ha = 247.1054 ac.
		expect(at(glyphosate, 'Covered area (ac)')).toBeCloseTo(1e6 / 4046.873, 2);
		expect(at(glyphosate, 'Price (USD/gal)')).toBeCloseTo(6.4 * 3.785412, 3);
	});
});

describe('unit conversions of money and amounts, against NIST SP 811 (2008) Appendix B', () => {
	// B.8 factors to seven significant digits: gallon [U.S.] 3.785 412 E-03 m3, pound (avdp)
	// 4.535 924 E-01 kg, acre (survey foot) 4.046 873 E+03 m2.
	test('amounts: 1 L is 1/3.785412 gal; 1 kg is 1/0.4535924 lb', () => {
		expect(amountIn(3.785412, 'L', 'us')).toBeCloseTo(1, 6);
		expect(amountIn(0.4535924, 'kg', 'us')).toBeCloseTo(1, 6);
		expect(amountIn(5, 'L', 'metric')).toBe(5);
	});
	test('prices: 1.00 per L is 3.785412 per gal; 1.00 per kg is 0.4535924 per lb', () => {
		expect(pricePerShownUnit(1, 'L', 'us')).toBeCloseTo(3.785412, 6);
		expect(pricePerShownUnit(1, 'kg', 'us')).toBeCloseTo(0.4535924, 7);
	});
	test('cost per area: 10.00 per ha is 4.046873 per ac (to the 4 ppm between survey and international acre)', () => {
		const perAc = perShownArea(10 / 1e4, 'us');
		expect(Math.abs(perAc - 4.046873) / 4.046873).toBeLessThan(5e-6);
		expect(perShownArea(10 / 1e4, 'metric')).toBeCloseTo(10, 12);
	});
});
