import { expect, it } from 'vitest';
import { percentOfFieldSprayed } from './of-field';

it('is the sprayed area per pass as a share of the field (worked by hand)', () => {
	// One pass spraying 8 of a 100 ha field: 8 %.
	expect(percentOfFieldSprayed(8e4, 1e6, 1)).toBeCloseTo(8, 12);
	// Two passes spraying 12 ha and 8 ha of the same 100 ha field: 20 / 200 = 10 %.
	expect(percentOfFieldSprayed(20e4, 1e6, 2)).toBeCloseTo(10, 12);
	expect(percentOfFieldSprayed(0, 1e6, 0)).toBeNull();
	expect(percentOfFieldSprayed(5, 0, 1)).toBeNull();
});
