import { describe, expect, test } from 'vitest';
import { calibrate, convertText, type CalibrationText } from './calibrate';

const blank: CalibrationText = { rate: '', speed: '', spacing: '', ratedFlow: '', ratedPressure: '', tank: '', area: '' };

describe('the calibration page', () => {
	test('US: 19.8 gal/ac at 6 mph and 20 in needs 0.4 gal/min (UF/IFAS WG013 [R1]); a 0.2 gal/min nozzle at 10 psi runs at 40 psi ([R61])', () => {
		const c = calibrate({ ...blank, rate: '19.8', speed: '6', spacing: '20', ratedFlow: '0.2', ratedPressure: '10' }, 'us', null);
		expect(c.problems).toEqual({});
		expect(c.flow!.value).toBeCloseTo(0.4, 12);
		expect(c.flow!.working).toBe('0.4 gal/min = 19.8 gal/ac × 6 mph × 20 in ÷ 5,940');
		expect(c.pressure!.value).toBeCloseTo(40, 10);
		expect(c.pressure!.ratio).toBeCloseTo(4, 10);
		expect(c.pressure!.rateAtRated).toBeCloseTo(9.9, 10);
	});

	test('metric: 200 L/ha at 7.8 km/h and 50 cm needs 1.3 L/min (Farm Ireland [R6])', () => {
		const c = calibrate({ ...blank, rate: '200', speed: '7,8', spacing: '50' }, 'metric', null);
		expect(c.flow!.value).toBeCloseTo(1.3, 12);
		expect(c.flow!.working).toBe('1.3 L/min = 200 L/ha × 7.8 km/h × 50 cm ÷ 60,000');
		expect(c.pressure).toBeNull();
	});

	test('tank: 800 gal at 10 gal/ac covers 80 ac; a 1 qt/ac product takes 20 gal (SDSU [R7], Missouri G1272 [R8])', () => {
		const gal = 3.785411784;
		const acre = 4046.8564224;
		const mix = { carrierRateLPerM2: (10 * gal) / acre, products: [{ name: 'P', unit: 'L' as const, ratePerM2: gal / 4 / acre }] };
		const c = calibrate({ ...blank, tank: '800', area: '3.5' }, 'us', mix);
		expect(c.tank!.areaSi / acre).toBeCloseTo(80, 9);
		expect(c.tank!.products[0].amountSi / gal).toBeCloseTo(20, 9);
		expect(c.part!.carrierSi / gal).toBeCloseTo(35, 9);
	});

	test('each bad value names its field and unit', () => {
		const c = calibrate({ ...blank, rate: 'lots', speed: '90', spacing: '200' }, 'metric', null);
		expect(c.problems).toEqual({
			rate: 'Target rate must be a number in L/ha, like 12.5.',
			speed: 'Speed must be between 1 and 40 km/h.',
			spacing: 'Nozzle spacing must be between 5 and 100 cm.'
		});
		expect(c.flow).toBeNull();
	});

	test('switching units converts what was typed (NIST SP 811 factors)', () => {
		expect(convertText({ ...blank, rate: '15', speed: '10', spacing: '20', ratedPressure: '40' }, 'us', 'metric')).toEqual({
			...blank,
			rate: '140.3',
			speed: '16.09',
			spacing: '50.8',
			ratedPressure: '2.758'
		});
	});
});
