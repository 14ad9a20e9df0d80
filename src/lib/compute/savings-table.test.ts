import { describe, expect, test } from 'vitest';
import { chemicalSaved } from './savings';
import { filterRows, savedCostByField, savingsRows, savingsTotals, sortRows, type CatalogueProduct, type SavingsApplication } from './savings-table';

// A demo-like fixture: the demo farm's catalogue (sample-data/demo/manifest.json) and invented
// applications with round numbers, so every figure below can be worked by hand.
//   Fallow knockdown: carrier 100 L/ha; glyphosate 1.5 L/ha at 6.40/L; dicamba 0.3 L/ha at 15.80/L.
//   Residual patch programme: carrier 120 L/ha; glyphosate 1.5 L/ha; flumioxazin 0.21 kg/ha at 118/kg.
const HA = 1e4;
const catalogue = new Map<string, CatalogueProduct>([
	['gly', { name: 'Glyphosate 540 (demo)', unit: 'L', pricePerUnit: 6.4 }],
	['dic', { name: 'Dicamba 480 (demo)', unit: 'L', pricePerUnit: 15.8 }],
	['flu', { name: 'Flumioxazin 51 WG (demo)', unit: 'kg', pricePerUnit: 118 }]
]);
const mixes = {
	fallow: { carrierRateLPerM2: 100 / HA, products: [['gly', 1.5 / HA], ['dic', 0.3 / HA]] },
	residual: { carrierRateLPerM2: 120 / HA, products: [['gly', 1.5 / HA], ['flu', 0.21 / HA]] }
} as const;

function application(fieldId: string, fieldName: string, season: number, mix: keyof typeof mixes, coveredHa: number, volumeL: number): SavingsApplication {
	const m = mixes[mix];
	return {
		fieldId,
		fieldName,
		season,
		coveredM2: coveredHa * HA,
		products: m.products.map(([productId, ratePerM2]) => {
			const s = chemicalSaved({ volumeL, coveredM2: coveredHa * HA, carrierRateLPerM2: m.carrierRateLPerM2 }, { ratePerM2 });
			return { productId, appliedUnits: s.appliedUnits, broadcastUnits: s.broadcastUnits };
		})
	};
}

const demoLike = [
	application('nf', 'North Flat', 2025, 'fallow', 100, 1200),
	application('cd', 'Coyote Draw', 2025, 'fallow', 50, 900),
	application('cd', 'Coyote Draw', 2025, 'residual', 4, 240),
	application('cd', 'Coyote Draw', 2024, 'fallow', 50, 600)
];

describe('savings rows: check values worked by hand from the demo-like fixture', () => {
	const rows = savingsRows(demoLike, catalogue);
	const row = (season: number, field: string, product: string) => rows.find((r) => r.season === season && r.fieldId === field && r.productId === product)!;

	test('North Flat 2025, glyphosate: 150 L broadcast, 18 L applied, 132 L and 844.80 saved', () => {
		// By hand: broadcast = 100 ha x 1.5 L/ha = 150 L; the log used 1,200 L of the 10,000 L a
		// broadcast pass at 100 L/ha needs (12 %), so 0.12 x 150 = 18 L applied; 132 L x 6.40 = 844.80.
		const r = row(2025, 'nf', 'gly');
		expect(r.broadcastUnits).toBeCloseTo(150, 9);
		expect(r.appliedUnits).toBeCloseTo(18, 9);
		expect(r.savedUnits).toBeCloseTo(132, 9);
		expect(r.percentSaved).toBeCloseTo(88, 9);
		expect(r.savedCost).toBeCloseTo(844.8, 6);
		// 18 L x 6.40 = 115.20 over 100 ha = 1.152 per ha (per m2: / 10,000).
		expect(r.appliedCostPerM2! * HA).toBeCloseTo(1.152, 9);
	});

	test('Coyote Draw 2025, glyphosate: the spring pass and the June patch add up', () => {
		// Spring: 50 ha x 1.5 = 75 L broadcast, 900 / 5,000 L = 18 % -> 13.5 L applied.
		// June: 4 ha x 1.5 = 6 L broadcast, 240 / 480 L = 50 % -> 3 L applied.
		// Together: 81 L broadcast, 16.5 L applied, 64.5 L saved = 412.80; 54 ha covered
		// -> 7.6444 saved per ha, 105.60 / 54 = 1.9556 applied per ha.
		const r = row(2025, 'cd', 'gly');
		expect(r.applications).toBe(2);
		expect(r.coveredM2).toBeCloseTo(54 * HA, 6);
		expect(r.broadcastUnits).toBeCloseTo(81, 9);
		expect(r.appliedUnits).toBeCloseTo(16.5, 9);
		expect(r.savedCost).toBeCloseTo(412.8, 6);
		expect(r.savedCostPerM2! * HA).toBeCloseTo(412.8 / 54, 9);
		expect(r.appliedCostPerM2! * HA).toBeCloseTo(105.6 / 54, 9);
	});

	test('Coyote Draw 2025, flumioxazin (kg): 0.84 kg broadcast, 0.42 kg applied, 49.56 saved', () => {
		const r = row(2025, 'cd', 'flu');
		expect(r.unit).toBe('kg');
		expect(r.broadcastUnits).toBeCloseTo(0.84, 9);
		expect(r.appliedUnits).toBeCloseTo(0.42, 9);
		expect(r.savedCost).toBeCloseTo(49.56, 6);
	});

	test('season 2025 over the farm: 1,918.62 saved (sum of the six hand-worked rows)', () => {
		// 844.80 + 417.12 (NF dicamba: 26.4 L x 15.80) + 412.80 + 194.34 (CD dicamba: 12.3 L) + 49.56
		const t = savingsTotals(filterRows(rows, { season: 2025 }));
		expect(t.savedCost).toBeCloseTo(1918.62, 6);
		const gly = t.products.find((p) => p.productId === 'gly')!;
		expect(gly.savedUnits).toBeCloseTo(132 + 64.5, 9);
		expect(gly.fields).toBe(2);
		expect(t.unpriced).toEqual([]);
	});

	test('rows come newest season first, then field and product by name', () => {
		expect(rows.map((r) => `${r.season} ${r.fieldName} ${r.productId}`)).toEqual([
			'2025 Coyote Draw dic',
			'2025 Coyote Draw flu',
			'2025 Coyote Draw gly',
			'2025 North Flat dic',
			'2025 North Flat gly',
			'2024 Coyote Draw dic',
			'2024 Coyote Draw gly'
		]);
	});
});

describe('savings totals', () => {
	const rows = savingsRows(demoLike, catalogue);

	test('money is the saved quantity times the catalogue price, in every row and total', () => {
		for (const r of rows) {
			expect(r.savedCost).toBeCloseTo(r.savedUnits * catalogue.get(r.productId)!.pricePerUnit!, 9);
			expect(r.appliedCost).toBeCloseTo(r.appliedUnits * catalogue.get(r.productId)!.pricePerUnit!, 9);
			expect(r.broadcastCost! - r.appliedCost!).toBeCloseTo(r.savedCost!, 9);
		}
		for (const p of savingsTotals(rows).products) expect(p.savedCost).toBeCloseTo(p.savedUnits * p.pricePerUnit!, 9);
	});

	test('the figures per field sum to the farm totals, for money and for each product', () => {
		const totals = savingsTotals(rows);
		const perField = savedCostByField(rows);
		expect([...perField.values()].reduce((a, b) => a + b, 0)).toBeCloseTo(totals.savedCost, 9);
		for (const p of totals.products) {
			const fieldSum = [...new Set(rows.map((r) => r.fieldId))]
				.map((f) => savingsTotals(filterRows(rows, { fieldId: f, productId: p.productId })))
				.reduce((s, t) => s + (t.products[0]?.savedUnits ?? 0), 0);
			expect(fieldSum).toBeCloseTo(p.savedUnits, 9);
		}
	});

	test('a product without a price has no money, is named, and leaves the money sums alone', () => {
		const noPrice = new Map(catalogue);
		noPrice.set('dic', { ...catalogue.get('dic')!, pricePerUnit: null });
		const r = savingsRows(demoLike, noPrice);
		const t = savingsTotals(r);
		expect(r.filter((x) => x.productId === 'dic').every((x) => x.savedCost === null && x.savedCostPerM2 === null)).toBe(true);
		expect(t.unpriced).toEqual(['Dicamba 480 (demo)']);
		expect(t.savedCost).toBeCloseTo(savingsTotals(rows).savedCost - savingsTotals(filterRows(rows, { productId: 'dic' })).savedCost, 9);
	});

	test('an application whose product is missing from the catalogue is a contract breach', () => {
		expect(() => savingsRows(demoLike, new Map())).toThrow(/not in the catalogue/);
	});
});

describe('sorting', () => {
	const rows = savingsRows(demoLike, catalogue);
	test('by money saved, biggest first, and back', () => {
		const down = sortRows(rows, 'savedCost', false).map((r) => r.savedCost!);
		expect(down).toEqual([...down].sort((a, b) => b - a));
		expect(sortRows(rows, 'savedCost', true).map((r) => r.savedCost)).toEqual([...down].reverse());
	});
	test('missing money sorts last in both directions', () => {
		const noPrice = new Map(catalogue);
		noPrice.set('flu', { ...catalogue.get('flu')!, pricePerUnit: null });
		const r = savingsRows(demoLike, noPrice);
		expect(sortRows(r, 'savedCost', true).at(-1)!.productId).toBe('flu');
		expect(sortRows(r, 'savedCost', false).at(-1)!.productId).toBe('flu');
	});
	test('by field name A to Z', () => {
		expect(sortRows(rows, 'field', true)[0].fieldName).toBe('Coyote Draw');
		expect(sortRows(rows, 'field', false)[0].fieldName).toBe('North Flat');
	});
});
