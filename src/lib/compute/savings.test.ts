import { describe, expect, test } from 'vitest';
import { carrierSaved, chemicalSaved } from './savings';

// Exact conversions, NIST SP 811 (2008) appendix B.
const ACRE_M2 = 4046.8564224;
const GAL_L = 3.785411784;

describe('savings (DOMAIN.md section 3, check value 6)', () => {
	// 160 acres at 10 GPA = 1600 gal broadcast equivalent; 400 gal used -> 75 % saved.
	const coveredM2 = 160 * ACRE_M2;
	const carrierRateLPerM2 = (10 * GAL_L) / ACRE_M2;
	const volumeL = 400 * GAL_L;

	test('carrier: 1600 gal equivalent, 75 % saved', () => {
		const r = carrierSaved(volumeL, coveredM2, carrierRateLPerM2);
		expect(r.broadcastL / GAL_L).toBeCloseTo(1600, 9);
		expect(r.savedL / GAL_L).toBeCloseTo(1200, 9);
		expect(r.percentSaved).toBeCloseTo(75, 9);
	});

	test('product at 1 qt/acre: 10 gal applied of 40 gal broadcast, 30 gal and 75 % saved', () => {
		// 1 qt = 1/4 US gal (NIST SP 811). Product used = 400/1600 of the broadcast amount (DOMAIN.md §3).
		const ratePerM2 = (0.25 * GAL_L) / ACRE_M2;
		const r = chemicalSaved({ volumeL, coveredM2, carrierRateLPerM2 }, { ratePerM2, pricePerUnit: 20 / GAL_L });
		expect(r.appliedUnits / GAL_L).toBeCloseTo(10, 9);
		expect(r.broadcastUnits / GAL_L).toBeCloseTo(40, 9);
		expect(r.savedUnits / GAL_L).toBeCloseTo(30, 9);
		expect(r.percentSaved).toBeCloseTo(75, 9);
		// Invented price of 20 per gallon: 600 saved, 200 spent instead of 800.
		expect(r.savedCost).toBeCloseTo(600, 6);
		expect(r.appliedCost).toBeCloseTo(200, 6);
		expect(r.broadcastCost).toBeCloseTo(800, 6);
	});

	test('no price gives no money figures; nothing covered gives no percent', () => {
		const r = chemicalSaved({ volumeL: 0, coveredM2: 0, carrierRateLPerM2: 0.01 }, { ratePerM2: 1e-4 });
		expect(r.savedCost).toBeNull();
		expect(r.percentSaved).toBeNull();
	});

	test('a zero carrier rate is refused', () => {
		expect(() => chemicalSaved({ volumeL: 1, coveredM2: 1, carrierRateLPerM2: 0 }, { ratePerM2: 1 })).toThrow(
			/carrier rate/
		);
	});
});
