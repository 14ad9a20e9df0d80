// Calibration check values from published extension sources (DOMAIN.md "Check values"), each
// source named beside its test; unit factors from NIST SP 811 (2008) Appendix B.
import { describe, expect, test } from 'vitest';
import {
	flowAtPressure,
	galPerAcFromFlow,
	galPerMinForRate,
	GPA_CONSTANT,
	L_PER_HA_CONSTANT,
	lPerHaFromFlow,
	lPerMinForRate,
	nozzleFlowForRate,
	partialLoad,
	pressureForFlow,
	rateFromNozzleFlow,
	tankLoad
} from './calibration';
import { convert, fromSi, toSi } from './units';

describe('nozzle flow and rate', () => {
	test('check 2: 5940 = 43,560 ft² per acre × 12 in per ft ÷ 88 ft/min per mph (UNL Pesticide Education, "Math for Pesticide Applicators" [R53])', () => {
		expect(GPA_CONSTANT).toBe(5940);
		expect(L_PER_HA_CONSTANT).toBe(60_000);
	});

	test('check 1: 0.4 gal/min at 6 mph and 20 in spacing gives 19.8 gal/ac (UF/IFAS EDIS WG013, "Calibration of Herbicide Applicators" [R1])', () => {
		expect(galPerAcFromFlow(0.4, 6, 20)).toBeCloseTo(19.8, 12);
		expect(galPerMinForRate(19.8, 6, 20)).toBeCloseTo(0.4, 12);
	});

	test('check 3: 1.3 L/min at 7.8 km/h and 50 cm gives 200 L/ha (Farm Ireland, "Useful formulae ... nozzle selection, forward speed, application rate" [R6])', () => {
		expect(lPerHaFromFlow(1.3, 7.8, 50)).toBeCloseTo(200, 10);
		expect(lPerMinForRate(200, 7.8, 50)).toBeCloseTo(1.3, 12);
	});

	test('the SI form, through NIST SP 811 factors (gal = 3.785411784 L, mph = 0.44704 m/s, in = 0.0254 m, acre = 4046.8564224 m²), gives the same 19.8 gal/ac [R1]', () => {
		const rate = rateFromNozzleFlow(toSi('flow', 0.4, 'gal/min'), toSi('speed', 6, 'mph'), toSi('length', 20, 'in'));
		expect(fromSi('volumePerArea', rate, 'gal/ac')).toBeCloseTo(19.8, 10);
		const flow = nozzleFlowForRate(toSi('volumePerArea', 19.8, 'gal/ac'), toSi('speed', 6, 'mph'), toSi('length', 20, 'in'));
		expect(fromSi('flow', flow, 'gal/min')).toBeCloseTo(0.4, 12);
	});

	test('and the same 200 L/ha in metric [R6]', () => {
		const rate = rateFromNozzleFlow(toSi('flow', 1.3, 'L/min'), toSi('speed', 7.8, 'km/h'), toSi('length', 50, 'cm'));
		expect(fromSi('volumePerArea', rate, 'L/ha')).toBeCloseTo(200, 9);
	});

	test('check 8: 19.8 gal/ac is 185.21 L/ha (1 gal/ac = 9.353956 L/ha from NIST SP 811 [R41])', () => {
		expect(convert('volumePerArea', 19.8, 'gal/ac', 'L/ha')).toBeCloseTo(19.8 * 9.353956, 4);
		expect(convert('volumePerArea', 15, 'gal/ac', 'L/ha')).toBeCloseTo(140.309, 3);
	});

	test('bad input is a contract breach, not a number', () => {
		expect(() => galPerAcFromFlow(0.4, 0, 20)).toThrow(/positive/);
		expect(() => lPerMinForRate(Number.NaN, 7.8, 50)).toThrow(/positive/);
	});
});

describe('pressure (orifice law, Q ∝ √P)', () => {
	test('check 4: 0.4 gal/min at 40 psi gives 0.2 at 10 psi and 0.8 at 160 psi (orifice flow law [R61])', () => {
		expect(flowAtPressure(0.4, 40, 10)).toBeCloseTo(0.2, 12);
		expect(flowAtPressure(0.4, 40, 160)).toBeCloseTo(0.8, 12);
		// Doubling the flow takes four times the pressure.
		expect(pressureForFlow(0.4, 40, 0.8)).toBeCloseTo(160, 10);
		expect(pressureForFlow(0.4, 40, 0.2)).toBeCloseTo(10, 10);
	});

	test('in bar and L/min the law is the same: 40 psi is 2.75790 bar (check 10, NIST SP 811 [R41])', () => {
		const bar = convert('pressure', 40, 'psi', 'bar');
		expect(bar).toBeCloseTo(2.7579, 4);
		const ratedLPerMin = convert('flow', 0.4, 'gal/min', 'L/min');
		expect(convert('pressure', pressureForFlow(ratedLPerMin, bar, 2 * ratedLPerMin), 'bar', 'psi')).toBeCloseTo(160, 9);
	});
});

describe('tank mix amounts', () => {
	test('check 5: an 800 gal tank at 10 gal/ac covers 80 ac and takes 80 qt = 20 gal of a 1 qt/ac product (SDSU Extension [R7]; Missouri Extension G1272 [R8])', () => {
		const load = tankLoad(800, 10, [{ ratePerM2: 1 }]); // gal, gal/ac, qt/ac: any consistent units
		expect(load.areaM2).toBe(80);
		expect(load.products[0]).toBe(80);
		expect(convert('volume', 80, 'qt', 'gal')).toBeCloseTo(20, 12);
	});

	test('the same tank in SI through NIST SP 811 factors', () => {
		const load = tankLoad(toSi('volume', 800, 'gal'), toSi('volumePerArea', 10, 'gal/ac'), [{ ratePerM2: toSi('volumePerArea', 1, 'qt/ac') }]);
		expect(fromSi('area', load.areaM2, 'ac')).toBeCloseTo(80, 10);
		expect(fromSi('volume', load.products[0], 'gal')).toBeCloseTo(20, 10);
	});

	test('a part tank: 3.5 ac at 15 gal/ac takes 52.5 gal, and 10.5 lb of a 3 lb/ac product ("Agrochemical and Pesticide Safety" handbook [R8b])', () => {
		const load = partialLoad(3.5, 15, [{ ratePerM2: 3 }]);
		expect(load.carrierL).toBeCloseTo(52.5, 12);
		expect(load.products[0]).toBeCloseTo(10.5, 12);
	});
});
