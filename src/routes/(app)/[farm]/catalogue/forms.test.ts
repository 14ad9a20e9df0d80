import { describe, expect, test } from 'vitest';
import { parseMachine, parseProduct, parseTankMix } from './forms';

function form(values: Record<string, string | string[]>) {
	const data = new FormData();
	for (const [k, v] of Object.entries(values)) for (const one of [v].flat()) data.append(k, one);
	return data;
}

const metricBoom = { name: 'Boom', boomWidth: '36', nozzleCount: '72', nozzleSpacing: '50', nozzlesPerSensor: '1' };

describe('machines', () => {
	test('120 ft, 144 nozzles at 10 in is 36.576 m and 0.254 m (NIST SP 811: ft = 0.3048 m, in = 0.0254 m)', () => {
		const parsed = parseMachine(form({ name: 'Spot boom', boomWidth: '120', nozzleCount: '144', nozzleSpacing: '10' }), 'us');
		if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
		expect(parsed.value.boomWidthM).toBeCloseTo(36.576, 12);
		expect(parsed.value.nozzleSpacingM).toBeCloseTo(0.254, 12);
		expect(parsed.value.nozzlesPerSensor).toBe(1);
		expect(parsed.value.nozzleFlowLPerS).toBeNull();
	});

	test('count × spacing must match the boom width within 1%: 0.9% passes, 1.1% is refused with both figures', () => {
		// 72 x 50 cm = 36 m; 36.33 m is 0.9% off, 36.40 m is 1.1% off.
		expect(parseMachine(form({ ...metricBoom, boomWidth: '36.33' }), 'metric').ok).toBe(true);
		const parsed = parseMachine(form({ ...metricBoom, boomWidth: '36.4' }), 'metric');
		expect(parsed.ok).toBe(false);
		if (!parsed.ok) {
			expect(parsed.problems.boomWidth).toBe(
				'72 nozzles × 50 cm = 36 m, but the boom width is 36.4 m (1.1% apart). They must agree within 1%: check the width, the count and the spacing.'
			);
		}
	});

	test('a 20 in spacing typed as 50 cm is caught (DOMAIN.md R3: a 1.6% error)', () => {
		// 60 nozzles at 20 in = 30.48 m; typed as 50 cm gives 30 m, 1.6% short: refused.
		expect(parseMachine(form({ name: 'B', boomWidth: '30.48', nozzleCount: '60', nozzleSpacing: '50' }), 'metric').ok).toBe(false);
	});

	test('missing, non-numeric, fractional and out-of-range values each get their own message', () => {
		const parsed = parseMachine(form({ name: '', boomWidth: 'wide', nozzleCount: '12.5', nozzleSpacing: '-3', nozzlesPerSensor: '0' }), 'metric');
		expect(parsed.ok).toBe(false);
		if (parsed.ok) return;
		expect(parsed.problems).toEqual({
			name: 'Give it a name.',
			boomWidth: 'The boom width must be a number, like 12.5.',
			nozzleCount: 'The nozzle count must be a whole number, like 12.',
			nozzleSpacing: 'The nozzle spacing must be more than 0.',
			nozzlesPerSensor: 'The number of nozzles per sensor must be between 1 and 1000.'
		});
		expect(parsed.values.boomWidth).toBe('wide');
	});

	test('range limits are stated in the unit typed: 200 ft is over 60 m', () => {
		const parsed = parseMachine(form({ name: 'B', boomWidth: '200', nozzleCount: '240', nozzleSpacing: '10' }), 'us');
		expect(parsed.ok).toBe(false);
		if (!parsed.ok) expect(parsed.problems.boomWidth).toBe('The boom width must be between 3.28 ft and 197 ft.');
	});

	test('a nozzle flow needs its pressure, and the reverse', () => {
		const flowOnly = parseMachine(form({ ...metricBoom, nozzleFlow: '1.5' }), 'metric');
		expect(!flowOnly.ok && flowOnly.problems.referencePressure).toContain('pressure the nozzle flow was measured at');
		const both = parseMachine(form({ ...metricBoom, nozzleFlow: '1.5', referencePressure: '3' }), 'metric');
		if (!both.ok) throw new Error(JSON.stringify(both.problems));
		expect(both.value.nozzleFlowLPerS).toBeCloseTo(0.025, 12);
		expect(both.value.referencePressurePa).toBe(300000);
	});
});

describe('products', () => {
	test('a price typed per gallon is stored per litre: $37.85/gal = $10.00/L (NIST SP 811: gal = 3.785411784 L)', () => {
		const parsed = parseProduct(form({ name: 'P', unit: 'L', price: '37.85411784', registrationNumber: ' EPA 000-00 ' }), 'us', true);
		if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
		expect(parsed.value.pricePerUnit).toBeCloseTo(10, 10);
		expect(parsed.value.registrationNumber).toBe('EPA 000-00');
	});

	test('a price per lb is stored per kg: $4.5359237/lb = $10/kg', () => {
		const parsed = parseProduct(form({ name: 'P', unit: 'kg', price: '4.5359237' }), 'us', true);
		expect(parsed.ok && parsed.value.pricePerUnit).toBeCloseTo(10, 10);
	});

	test('a role without prices cannot set one, even by sending the field', () => {
		const parsed = parseProduct(form({ name: 'P', unit: 'L', price: '99' }), 'metric', false);
		expect(parsed.ok && parsed.value.pricePerUnit).toBeNull();
		expect(parsed.values).not.toHaveProperty('price');
	});

	test('the unit must be L or kg; a negative price is refused', () => {
		const parsed = parseProduct(form({ name: 'P', unit: 'gal', price: '-1' }), 'metric', true);
		expect(parsed.ok).toBe(false);
		if (!parsed.ok) expect(Object.keys(parsed.problems)).toEqual(['unit']);
		const negative = parseProduct(form({ name: 'P', unit: 'L', price: '-1' }), 'metric', true);
		expect(!negative.ok && negative.problems.price).toBe('The price cannot be negative.');
	});
});

describe('tank mixes', () => {
	const catalogue = [
		{ id: 'gly', name: 'Glyphosate', unit: 'L' as const },
		{ id: 'ams', name: 'AMS', unit: 'kg' as const }
	];

	test('15 GPA with 32 fl oz/ac and 1 lb/ac: 140.309 L/ha, 2.338 L/ha, 1.121 kg/ha (DOMAIN.md checks 8 and 12)', () => {
		const parsed = parseTankMix(
			form({ name: 'Mix', carrierRate: '15', productId: ['gly', 'ams', ''], rate: ['32', '1', ''], rateUnit: ['fl oz/ac', 'lb/ac', ''] }),
			'us',
			catalogue
		);
		if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
		expect(parsed.value.carrierRateLPerM2 * 1e4).toBeCloseTo(140.309, 3);
		expect(parsed.value.products[0].ratePerM2 * 1e4).toBeCloseTo(2.33849, 5);
		expect(parsed.value.products[1].ratePerM2 * 1e4).toBeCloseTo(1.120851, 6);
		expect(parsed.warnings).toEqual([]);
	});

	test('carrier rates outside 5-500 L/ha are refused; outside 20-200 L/ha saved with a warning (common practice, no source)', () => {
		const mix = (carrierRate: string) => form({ name: 'M', carrierRate, productId: 'gly', rate: '1', rateUnit: 'L/ha' });
		expect(parseTankMix(mix('4.9'), 'metric', catalogue).ok).toBe(false);
		expect(parseTankMix(mix('501'), 'metric', catalogue).ok).toBe(false);
		const low = parseTankMix(mix('10'), 'metric', catalogue);
		expect(low.ok && low.warnings).toEqual(['A carrier rate of 10 L/ha is outside the usual 20 L/ha to 200 L/ha: check it against the label.']);
		const usual = parseTankMix(mix('100'), 'metric', catalogue);
		expect(usual.ok && usual.warnings).toEqual([]);
	});

	test('a liquid product rate above the carrier rate, a product twice, a rate without a product and a wrong unit are refused per row', () => {
		const parsed = parseTankMix(
			form({
				name: 'M',
				carrierRate: '50',
				productId: ['gly', 'gly', '', 'ams'],
				rate: ['60', '1', '2', '3'],
				rateUnit: ['L/ha', 'L/ha', 'L/ha', 'L/ha']
			}),
			'metric',
			catalogue
		);
		expect(parsed.ok).toBe(false);
		if (parsed.ok) return;
		expect(parsed.problems['rate-0']).toBe('60 L/ha of Glyphosate is more than the whole carrier rate (50 L/ha): check both.');
		expect(parsed.problems['product-2']).toBe('Choose the product for this rate.');
		expect(parsed.problems['rate-3']).toBe('AMS is dry: give its rate in kg/ha, g/ha.');
		expect(parsed.values.rate).toEqual(['60', '1', '2', '3']);
	});

	test('a product listed twice is named', () => {
		const parsed = parseTankMix(form({ name: 'M', carrierRate: '100', productId: ['gly', 'gly'], rate: ['1', '2'] }), 'metric', catalogue);
		expect(!parsed.ok && parsed.problems['product-1']).toBe('Glyphosate is listed twice; give it one rate.');
	});

	test('a mix needs at least one product, and only this farm’s', () => {
		const empty = parseTankMix(form({ name: 'M', carrierRate: '100', productId: '', rate: '' }), 'metric', catalogue);
		expect(!empty.ok && empty.problems.products).toBe('Add at least one product with its label rate.');
		const foreign = parseTankMix(form({ name: 'M', carrierRate: '100', productId: 'elsewhere', rate: '1' }), 'metric', catalogue);
		expect(!foreign.ok && foreign.problems['product-0']).toBe('Choose a product from this farm’s catalogue.');
	});
});

describe('machine quality limits', () => {
	test('typed in US units, kept in SI: 12 mph, 40 ± 5 in, 30–60 psi (NIST SP 811: mph = 0.44704 m/s, in = 0.0254 m, psi = 6894.757 Pa)', () => {
		const parsed = parseMachine(
			form({ name: 'Spot boom', boomWidth: '120', nozzleCount: '144', nozzleSpacing: '10', maxSpeed: '12', targetHeight: '40', heightTolerance: '5', pressureMin: '30', pressureMax: '60' }),
			'us'
		);
		if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
		expect(parsed.value.maxSpeedMPerS).toBeCloseTo(12 * 0.44704, 12);
		expect(parsed.value.targetHeightM).toBeCloseTo(1.016, 12);
		expect(parsed.value.heightToleranceM).toBeCloseTo(0.127, 12);
		expect(parsed.value.pressureMinPa).toBeCloseTo(30 * 6894.757, 1);
		expect(parsed.value.pressureMaxPa).toBeCloseTo(60 * 6894.757, 1);
	});

	test('limits are optional; a height needs its tolerance, the tolerance fits inside the height, min is below max', () => {
		const none = parseMachine(form(metricBoom), 'metric');
		expect(none.ok && none.value.maxSpeedMPerS).toBeNull();
		const parsed = parseMachine(form({ ...metricBoom, targetHeight: '50', pressureMin: '4', pressureMax: '2', maxSpeed: '300' }), 'metric');
		expect(parsed.ok).toBe(false);
		if (parsed.ok) return;
		expect(parsed.problems.heightTolerance).toBe('Give how far above or below the target height is still fine, or leave both empty.');
		expect(parsed.problems.pressureMax).toBe('The highest pressure must be above the lowest (4 bar).');
		expect(parsed.problems.maxSpeed).toBe('The maximum speed must be between 2 km/h and 60 km/h.');
		const wide = parseMachine(form({ ...metricBoom, targetHeight: '50', heightTolerance: '60' }), 'metric');
		expect(!wide.ok && wide.problems.heightTolerance).toBe('The tolerance must be less than the target height (50 cm).');
	});
});
