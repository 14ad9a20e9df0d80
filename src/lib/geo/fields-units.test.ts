import { expect, test } from 'vitest';
import { formatAreaM2, formatLengthM } from './fields-units';

test('hectares: 1 ha = 10,000 m2 (SI brochure, 9th ed., table 8)', () => {
	expect(formatAreaM2(123_456, 'metric')).toBe('12.35 ha');
});

test('acres: 1 acre = 4046.8564224 m2 (NIST SP 811, Appendix B)', () => {
	expect(formatAreaM2(4046.8564224 * 40, 'us')).toBe('40.00 ac');
	expect(formatAreaM2(10_000, 'us')).toBe('2.47 ac');
});

test('feet: 1 ft = 0.3048 m (NIST SP 811, Appendix B)', () => {
	expect(formatLengthM(10, 'us')).toBe('32.8 ft');
	expect(formatLengthM(10, 'metric')).toBe('10 m');
});
