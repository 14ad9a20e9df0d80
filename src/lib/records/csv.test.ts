import Papa from 'papaparse';
import { expect, test } from 'vitest';
import { recordsCsv, type CsvRecord } from './csv';
import { emptyInput, type RecordFacts } from './facts';

const facts: RecordFacts = {
	farmName: 'Tallowgrass Farm',
	timeZone: 'America/Los_Angeles',
	fieldId: 'f1',
	fieldName: 'North Flat',
	fieldAreaM2: 647_497,
	fieldPoint: [-118.2782, 47.1144],
	day: '2025-04-14',
	season: 2025,
	startedAt: '2025-04-14T15:14:00.000Z',
	endedAt: '2025-04-14T18:32:00.000Z',
	machineName: 'Spot sprayer 36.6 m',
	tankMixName: 'Fallow knockdown',
	carrierRateLPerM2: 0.01,
	coveredM2: 404_685.64224, // 100 ac
	sprayedM2: 40_468.564224, // 10 ac
	volumeL: 378.5411784, // 100 gal
	products: [
		{ productId: 'p1', name: 'Glyphosate 540 (demo)', unit: 'L', ratePerM2: 0.00015, appliedUnits: 5.678, catalogueRegistration: 'R-1' },
		{ productId: 'p2', name: 'Flumioxazin 51 WG (demo)', unit: 'kg', ratePerM2: 0.000021, appliedUnits: 0.45359237, catalogueRegistration: null }
	],
	uploadedBy: ['Sam Reyes']
};

const signed: CsvRecord = {
	status: 'signed',
	facts,
	input: {
		...emptyInput(),
		applicatorName: 'Sam Reyes',
		applicatorCertification: 'WA-12345',
		clientName: 'Tallowgrass Farm',
		clientAddress: '1 Road, "The Flats"\nCorran Valley',
		crop: 'Fallow',
		targetWeeds: '=kochia', // a formula in a cell must stay text
		windSpeedMPerS: 6 * 0.44704,
		windFrom: 'SW',
		airTemperatureC: 18,
		relativeHumidityPercent: 45,
		registrationNumbers: { p1: 'R-1', p2: 'R-2' }
	},
	signedByName: 'Sam Reyes',
	signedAt: new Date('2025-04-14T19:00:00Z'),
	amendments: [{}],
	quality: null
};

test('RFC 4180: CRLF, quoted commas, quotes and line breaks; one row per product; units in the header; US units', () => {
	const csv = recordsCsv([signed, { ...signed, status: 'none', input: emptyInput(), signedByName: null, signedAt: null, amendments: [] }], 'us');
	expect(csv.endsWith('\r\n')).toBe(true);
	expect(csv.split('\r\n')[0]).toContain('Area driven over (ac),Area sprayed (ac)');
	expect(csv).toContain('"1 Road, ""The Flats""\nCorran Valley"');
	const parsed = Papa.parse<Record<string, string>>(csv.trimEnd(), { header: true, newline: '\r\n' });
	expect(parsed.errors).toEqual([]);
	expect(parsed.data).toHaveLength(4);
	const [gly, flu, blank] = parsed.data;
	expect(gly).toMatchObject({
		'Record state': 'signed',
		Date: '2025-04-14',
		'Start (local time)': '08:14',
		'End (local time)': '11:32',
		'Area driven over (ac)': '100',
		'Area sprayed (ac)': '10',
		'Total spray volume (gal)': '100',
		Product: 'Glyphosate 540 (demo)',
		'Registration number': 'R-1',
		'Amount applied (gal)': '1.5', // 5.678 L = 1.49996 gal
		'Amount applied (lb)': '',
		'Wind speed (mph)': '6',
		'Air temperature (°F)': '64.4',
		'Target weeds': "'=kochia",
		Amendments: '1'
	});
	expect(flu).toMatchObject({ Product: 'Flumioxazin 51 WG (demo)', 'Amount applied (lb)': '1', 'Registration number': 'R-2' });
	expect(blank).toMatchObject({ 'Record state': 'not started', 'Applicator name': '', 'Wind speed (mph)': '' });
});

test('metric headers', () => {
	const header = recordsCsv([signed], 'metric').split('\r\n')[0];
	expect(header).toContain('Area sprayed (ha)');
	expect(header).toContain('Wind speed (km/h)');
	expect(header).toContain('Air temperature (°C)');
	expect(header).toContain('Label rate (L/ha),Label rate (kg/ha),Amount applied (L),Amount applied (kg)');
});
