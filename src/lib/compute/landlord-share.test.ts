import { describe, expect, it } from 'vitest';
import { landlordShare, leaseLabel, leaseOf } from './landlord-share';

// The rule: a crop-share landlord shares herbicide cost in the same percentage as the crop
// (Purdue NCR-105: a 50/50 or 1/3-2/3 lease shares herbicide cost 50/50 or 1/3-2/3). The check
// values are worked by hand.
describe('landlordShare', () => {
	it('is the crop share times the cost', () => {
		// A 50/50 lease: half of 1,261.92 = 630.96.
		expect(landlordShare(1261.92, leaseOf(50))).toBeCloseTo(630.96, 10);
		// A one-third share: 1,500 / 3 = 500; 33.3 % of 1,500 = 499.50.
		expect(landlordShare(1500, leaseOf(100 / 3))).toBeCloseTo(500, 10);
		expect(landlordShare(1500, leaseOf(33.3))).toBeCloseTo(499.5, 10);
		// 25 % of 844.80 = 211.20.
		expect(landlordShare(844.8, leaseOf(25))).toBeCloseTo(211.2, 10);
	});

	it('is all or nothing at the ends of the range', () => {
		expect(landlordShare(812.5, leaseOf(100))).toBe(812.5);
		expect(landlordShare(812.5, leaseOf(0))).toBe(0);
	});

	it('is none under cash rent, and unknown without a cost', () => {
		expect(landlordShare(812.5, leaseOf(null))).toBeNull();
		expect(landlordShare(null, leaseOf(25))).toBeNull();
		expect(landlordShare(0, leaseOf(25))).toBe(0);
	});

	it('refuses a stored share outside 0..100 (a contract breach: forms check first)', () => {
		expect(() => leaseOf(120)).toThrow(/0\.\.100/);
		expect(() => leaseOf(-1)).toThrow();
		expect(() => leaseOf(Number.NaN)).toThrow();
	});

	it('says the lease in words', () => {
		expect(leaseLabel(leaseOf(33.3))).toBe('33.3 % crop share');
		expect(leaseLabel(leaseOf(25))).toBe('25 % crop share');
		expect(leaseLabel(leaseOf(null))).toBe('Cash rent');
	});
});
