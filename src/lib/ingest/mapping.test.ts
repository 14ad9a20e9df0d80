import { describe, expect, test } from 'vitest';
import { detectMapping, normalizeHeader } from './mapping';

// Invented header names in the styles logs use: not copied from any product.
describe('detectMapping', () => {
	test('tolerates case, spaces, underscores and units in brackets', () => {
		expect(normalizeHeader('  Rate [L/ha] ')).toEqual({ name: 'rate', unit: 'l/ha' });
		expect(normalizeHeader('GPS_Latitude')).toEqual({ name: 'gps latitude', unit: null });
		const headers = ['Fix Time (UTC)', 'GPS_Latitude', 'gps longitude', 'Ground Speed [mph]', 'Applied Rate (gal/ac)', 'Boom Pressure psi', 'Flow Rate [L/min]', 'Boom Height (ft)', 'HEADING', 'Master Switch', 'Nozzle States'];
		const sample = [['2024-05-14T15:00:00Z', '38.5', '-98.5', '6.7', '15', '40', '30', '2', '0', '1', '0101']];
		expect(detectMapping(headers, sample)).toEqual({
			time: { kind: 'iso', column: 'Fix Time (UTC)' },
			position: { kind: 'lngLat', lng: 'gps longitude', lat: 'GPS_Latitude' },
			spray: { kind: 'nozzles', columns: ['Nozzle States'] },
			decimalComma: false,
			speed: { column: 'Ground Speed [mph]', unit: 'mph' },
			heading: { column: 'HEADING' },
			master: { column: 'Master Switch' },
			rate: { column: 'Applied Rate (gal/ac)', unit: 'gal/ac' },
			flow: { column: 'Flow Rate [L/min]', unit: 'L/min' },
			pressure: { column: 'Boom Pressure psi', unit: 'psi' },
			boomHeight: { column: 'Boom Height (ft)', unit: 'ft' }
		});
	});

	test('nozzle states split over several columns keep file order; epoch milliseconds are recognised', () => {
		const m = detectMapping(['epoch_ms', 'lat', 'lon', 'noz_1', 'noz_2', 'noz_3', 'note'], [['1715698800000', '38.5', '-98.5', '0101', '1111', '00', 'x']]);
		expect(m.spray).toEqual({ kind: 'nozzles', columns: ['noz_1', 'noz_2', 'noz_3'] });
		expect(m.time).toEqual({ kind: 'epoch', column: 'epoch_ms', unit: 'ms' });
	});

	test('x/y columns are proposed without guessing a CRS', () => {
		const m = detectMapping(['time', 'Easting [m]', 'Northing [m]', 'sprayed fraction'], [['1715698800', '542284.6', '4262625.4', '0.4']]);
		expect(m.position).toEqual({ kind: 'xy', x: 'Easting [m]', y: 'Northing [m]', crs: null });
		expect(m.spray).toEqual({ kind: 'fraction', column: 'sprayed fraction', scale: 'unit' });
		expect(m.time).toEqual({ kind: 'epoch', column: 'time', unit: 's' });
	});

	test('month-first dates when a day above 12 says so', () => {
		const m = detectMapping(['Date', 'Time', 'Lat', 'Long', 'Active Width (m)'], [['05/14/2024', '15:00:00', '38.5', '-98.5', '12']]);
		expect(m.time).toEqual({ kind: 'dateAndTime', dateColumn: 'Date', timeColumn: 'Time', dateOrder: 'mdy' });
		expect(m.spray).toEqual({ kind: 'activeWidth', column: 'Active Width (m)', unit: 'm' });
	});

	test('unknown headers map to nothing rather than to a guess', () => {
		expect(detectMapping(['alpha', 'beta'], [['1', '2']])).toEqual({ time: null, position: null, spray: null, decimalComma: false });
	});
});
