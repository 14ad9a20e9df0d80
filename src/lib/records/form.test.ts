import { describe, expect, test } from 'vitest';
import { emptyInput, missingForSignOff, timeSpan } from './facts';
import { changesBetween, formValues, parseRecordForm, weatherCautions } from './form';

function form(values: Record<string, string>) {
	const data = new FormData();
	for (const [k, v] of Object.entries(values)) data.append(k, v);
	return data;
}
const products = [{ productId: 'p1', name: 'Glyphosate 540 (demo)' }];
const complete = {
	applicatorName: 'Sam Reyes',
	applicatorCertification: 'WA-12345',
	clientName: 'Tallowgrass Farm',
	clientAddress: '1 Road, Town',
	crop: 'Fallow (wheat stubble)',
	targetWeeds: 'Russian thistle, kochia',
	windSpeed: '6',
	windFrom: 'SW',
	airTemperature: '64.4',
	relativeHumidity: '45',
	'reg-p1': 'DEMO-REG-10451'
};

describe('the record form', () => {
	test('US units are kept in SI: 6 mph = 2.68224 m/s, 64.4 °F = 18 °C (NIST SP 811)', () => {
		const { input, problems } = parseRecordForm(form(complete), 'us', products);
		expect(problems).toEqual({});
		expect(input.windSpeedMPerS).toBeCloseTo(6 * 0.44704, 12);
		expect(input.airTemperatureC).toBeCloseTo(18, 12);
		expect(input.registrationNumbers).toEqual({ p1: 'DEMO-REG-10451' });
		expect(missingForSignOff(input, { products: [{ productId: 'p1', name: 'Glyphosate 540 (demo)' }] as never })).toEqual({});
		// And back into the form, as typed.
		expect(formValues(input, 'us')).toMatchObject({ windSpeed: '6', airTemperature: '64.4', relativeHumidity: '45' });
	});

	test('a decimal comma is read; wrong numbers and out-of-range values name their field', () => {
		const { input, problems } = parseRecordForm(form({ windSpeed: '12,5', airTemperature: 'warm', relativeHumidity: '140', windFrom: 'SWW' }), 'metric', products);
		expect(input.windSpeedMPerS).toBeCloseTo(12.5 / 3.6, 12);
		expect(problems).toEqual({
			airTemperature: 'Air temperature must be a number in °C, like 18.',
			relativeHumidity: 'Relative humidity must be between 0 and 100 %.',
			windFrom: 'Wind from: choose a compass point, or “variable”.'
		});
		expect(parseRecordForm(form({ windSpeed: '200' }), 'metric', products).problems.windSpeed).toBe('Wind speed must be between 0 and 144 km/h.');
	});

	test('sign-off needs every required element, and each product’s registration number', () => {
		const missing = missingForSignOff(emptyInput(), { products: [{ productId: 'p1', name: 'Glyphosate 540 (demo)' }] as never });
		expect(Object.keys(missing).sort()).toEqual(
			['airTemperature', 'applicatorCertification', 'applicatorName', 'clientAddress', 'clientName', 'crop', 'reg-p1', 'relativeHumidity', 'targetWeeds', 'windFrom', 'windSpeed'].sort()
		);
		expect(missing.applicatorCertification).toBe('Certification number is needed before the record can be signed.');
		expect(missing['reg-p1']).toBe('The registration number of Glyphosate 540 (demo) is needed before the record can be signed.');
	});

	test('weather cautions: calm air (under 3 mph) and wind over 8 mph (stewardship advice, DOMAIN.md §6)', () => {
		const calm = parseRecordForm(form({ windSpeed: '2' }), 'us', products).input;
		expect(weatherCautions(calm, 'us')[0]).toMatch(/^Wind under 3 mph: calm air can mean a temperature inversion/);
		const windy = parseRecordForm(form({ windSpeed: '20' }), 'metric', products).input;
		expect(weatherCautions(windy, 'metric')).toEqual([
			'Wind over 13 km/h: above what stewardship advice suggests when a label sets no limit. Check the label\'s wind limit and drift buffers.'
		]);
		expect(weatherCautions(parseRecordForm(form({ windSpeed: '8' }), 'metric', products).input, 'metric')).toEqual([]);
	});

	test('an amendment lists each changed element as people read it', () => {
		const before = parseRecordForm(form(complete), 'metric', products).input;
		const after = parseRecordForm(form({ ...complete, windSpeed: '9', targetWeeds: 'Kochia', 'reg-p1': 'DEMO-REG-10452' }), 'metric', products).input;
		expect(changesBetween(before, after, 'metric', products)).toEqual([
			{ field: 'targetWeeds', label: 'Target weeds', before: 'Russian thistle, kochia', after: 'Kochia' },
			{ field: 'windSpeedMPerS', label: 'Wind speed', before: '6 km/h', after: '9 km/h' },
			{ field: 'reg-p1', label: 'Registration number of Glyphosate 540 (demo)', before: 'DEMO-REG-10451', after: 'DEMO-REG-10452' }
		]);
		expect(changesBetween(before, before, 'us', products)).toEqual([]);
	});

	test('times are the farm’s local times with the offset', () => {
		expect(timeSpan({ startedAt: '2025-04-14T15:14:00Z', endedAt: '2025-04-14T18:32:10Z', timeZone: 'America/Los_Angeles' })).toBe('08:14–11:32 (UTC−7)');
	});
});
