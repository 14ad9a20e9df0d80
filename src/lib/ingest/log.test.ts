import { describe, expect, test } from 'vitest';
import { readLog, readLogHeader } from './log';
import type { ColumnMapping } from './mapping';
import { chunked, latin1, utf8 } from './testing';
import { ACRE_M2, US_GALLON_L } from './units';

const N = 8;
const bits = (s: string) => s; // nozzle strings are written literally for readability
const base: ColumnMapping = {
	time: { kind: 'iso', column: 'time' },
	position: { kind: 'lngLat', lng: 'lon', lat: 'lat' },
	spray: { kind: 'nozzles', columns: ['nozzles'] }
};

// Invented log rows: a boom near an invented point in Kansas.
const header = 'time,lat,lon,nozzles,speed';
const rows = [
	`2024-05-14T15:00:00Z,38.511000,-98.515000,${bits('10000001')},10.8`,
	`2024-05-14T15:00:01Z,38.511027,-98.515000,${bits('11000011')},10.8`,
	`2024-05-14T15:00:02Z,38.511054,-98.515000,${bits('00000000')},10.8`
];
const csv = [header, ...rows].join('\n') + '\n';

async function read(text: string | Uint8Array, mapping: ColumnMapping = base, chunk = 7, name = 'log.csv') {
	const bytes = typeof text === 'string' ? utf8(text) : text;
	return readLog(name, chunked(bytes, chunk), mapping, { nozzleCount: N });
}

describe('readLog on CSV', () => {
	test('reads rows into typed columns, across 7-byte chunks', async () => {
		const r = await read(csv, { ...base, speed: { column: 'speed', unit: 'km/h' } });
		expect(r.errors).toEqual([]);
		const f = r.fixes!;
		expect(f.count).toBe(3);
		// Epoch of 2024-05-14T15:00:00Z: ECMAScript Date.UTC (ECMA-262 21.4.3.4), independent of this code.
		expect(f.timeS[0]).toBe(Date.UTC(2024, 4, 14, 15) / 1000);
		expect(f.timeS[2] - f.timeS[0]).toBe(2);
		expect([f.lng[1], f.lat[1]]).toEqual([-98.515, 38.511027]);
		expect([...f.sourceRow]).toEqual([2, 3, 4]);
		// Bit layout of types.ts: nozzle k is bit k % 32 of word k >> 5; '10000001' -> bits 0 and 7.
		expect(f.spray.kind === 'nozzles' && f.spray.bits[0]).toBe(0b10000001);
		expect(f.spray.kind === 'nozzles' && f.spray.bits[1]).toBe(0b11000011);
		// 10.8 km/h = 3 m/s (1 km/h = 1/3.6 m/s, NIST SP 811 B.8).
		expect(f.speedMPerS![0]).toBeCloseTo(3, 6);
	});

	test('empty file', async () => {
		const r = await read('');
		expect(r.fixes).toBeNull();
		expect(r.errors).toEqual([{ file: 'log.csv', row: null, column: null, message: 'is empty' }]);
	});

	test('header only', async () => {
		const r = await read(header + '\n');
		expect(r.fixes).toBeNull();
		expect(r.errors[0].message).toBe('has a header but no data rows');
		await expect(readLogHeader('log.csv', chunked(utf8(header + '\n'), 5))).resolves.toMatchObject({ preview: [], warnings: [{ message: 'has a header but no data rows' }] });
	});

	test('missing required column names the column', async () => {
		const r = await read(csv.replace('nozzles', 'nozzle_bits'));
		expect(r.fixes).toBeNull();
		expect(r.errors).toContainEqual({ file: 'log.csv', row: null, column: 'nozzles', message: "required column 'nozzles' (nozzle states) is missing from the file" });
	});

	test('a mapping without position is refused', async () => {
		const r = await read(csv, { ...base, position: null });
		expect(r.errors[0].message).toMatch(/position is required/);
	});

	test('swapped latitude and longitude for the whole file', async () => {
		const swapped = [header, ...rows.map((r) => r.replace('38.51', 'X').replace('-98.515000', '38.51').replace('X', '-98.515000'))].join('\n');
		const r = await read(swapped);
		expect(r.fixes).toBeNull();
		expect(r.errors[0]).toMatchObject({ file: 'log.csv', row: 2, column: 'lat' });
		expect(r.errors[0].message).toMatch(/latitude and longitude look swapped for the whole file/);
		expect(r.errors).toHaveLength(1);
	});

	test('a single swapped row is named by row and column', async () => {
		const one = [header, rows[0], rows[1].replace('38.511027,-98.515000', '-98.515000,38.511027'), rows[2]].join('\n');
		const r = await read(one);
		expect(r.errors).toEqual([{ file: 'log.csv', row: 3, column: 'lat', message: 'latitude -98.515 is beyond 90 degrees while longitude 38.511027 is not: latitude and longitude look swapped' }]);
	});

	test('projected numbers without a CRS', async () => {
		const utm = [header, '2024-05-14T15:00:00Z,4262625.44,542284.65,10000001,10', '2024-05-14T15:00:01Z,4262628.44,542284.65,10000001,10'].join('\n');
		const r = await read(utm);
		expect(r.fixes).toBeNull();
		expect(r.errors[0]).toMatchObject({ row: 2, column: 'lat' });
		expect(r.errors[0].message).toMatch(/projected numbers .* no coordinate system was chosen: map them as x\/y and choose an EPSG code/);
	});

	test('x/y in UTM 14N (EPSG:32614) and NAD83 (EPSG:26914) come back to the degrees PROJ gave', async () => {
		// x/y from `gdaltransform -s_srs EPSG:4326 -t_srs EPSG:32614` (PROJ via GDAL 3.6.2) for -98.515, 38.511.
		for (const [epsg, x, y] of [
			[32614, 542284.650518507, 4262625.44285847],
			[26914, 542284.650518776, 4262625.44274678],
			[3857, -10966639.6354993, 4651866.61459684]
		]) {
			const text = `time;easting;northing;nozzles\n2024-05-14T15:00:00Z;${x};${y};10000001\n`;
			const r = await read(text, { ...base, position: { kind: 'xy', x: 'easting', y: 'northing', crs: epsg } });
			expect(r.errors).toEqual([]);
			expect(r.fixes!.lng[0]).toBeCloseTo(-98.515, 8);
			expect(r.fixes!.lat[0]).toBeCloseTo(38.511, 8);
		}
		// Southern hemisphere zone 21S (EPSG:32721), same source.
		const south = `time,x,y,nozzles\n2024-05-14T15:00:00Z,177658.5095585,6204578.81664832,10000001\n`;
		const r = await read(south, { ...base, position: { kind: 'xy', x: 'x', y: 'y', crs: 32721 } });
		expect([r.fixes!.lng[0], r.fixes!.lat[0]].map((v) => +v.toFixed(8))).toEqual([-60.5, -34.25]);
	});

	test('x/y with a proj4 string instead of an EPSG code', async () => {
		const text = 'time,x,y,nozzles\n2024-05-14T15:00:00Z,542284.650518507,4262625.44285847,10000001\n';
		const crs = '+proj=utm +zone=14 +datum=WGS84 +units=m +no_defs';
		const r = await read(text, { ...base, position: { kind: 'xy', x: 'x', y: 'y', crs } });
		// Same PROJ (gdaltransform, GDAL 3.6.2) point as above.
		expect([r.fixes!.lng[0], r.fixes!.lat[0]].map((v) => +v.toFixed(8))).toEqual([-98.515, 38.511]);
		const bad = await read(text, { ...base, position: { kind: 'xy', x: 'x', y: 'y', crs: 99999 } });
		expect(bad.errors[0].message).toBe('EPSG:99999 is not supported; give a proj4 definition instead');
	});

	test('x/y without an EPSG code is refused before reading', async () => {
		const r = await read(csv, { ...base, position: { kind: 'xy', x: 'lon', y: 'lat', crs: null } });
		expect(r.errors[0].message).toMatch(/need a coordinate system: choose an EPSG code/);
	});

	test('decimal commas with ; as delimiter', async () => {
		const text = 'time;lat;lon;nozzles;rate\n2024-05-14T15:00:00Z;38,511;-98,515;10000001;47,123\n2024-05-14T15:00:01Z;38,5111;-98,515;10000001;47,5\n';
		const h = await readLogHeader('log.csv', chunked(utf8(text), 11));
		expect(h.delimiter).toBe(';');
		expect(h.suggested.decimalComma).toBe(true);
		expect(h.headers).toEqual(['time', 'lat', 'lon', 'nozzles', 'rate']);
		const r = await read(text, { ...h.suggested });
		expect(r.errors).toEqual([]);
		expect(r.fixes!.lat[0]).toBe(38.511);
		// 47.123 L/ha = 47.123e-4 L/m2 (1 ha = 1e4 m2, NIST SP 811).
		expect(r.fixes!.rateLPerM2![0]).toBeCloseTo(47.123e-4, 9);
	});

	test('BOM is stripped from the first header', async () => {
		const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...utf8(csv)]);
		const h = await readLogHeader('log.csv', chunked(bytes, 2));
		expect(h.headers[0]).toBe('time');
		expect(h.encoding).toBe('utf-8');
		const r = await read(bytes);
		expect(r.errors).toEqual([]);
		expect(r.fixes!.count).toBe(3);
	});

	test('Latin-1 header (windows-1252) is decoded', async () => {
		const text = 'Zeit;Breitengrad;Längengrad;Düsen;Geschwindigkeit (km/h)\n2024-05-14T15:00:00Z;38,511;-98,515;10000001;10,8\n';
		const h = await readLogHeader('log.csv', chunked(latin1(text), 4));
		expect(h.encoding).toBe('windows-1252');
		expect(h.headers).toEqual(['Zeit', 'Breitengrad', 'Längengrad', 'Düsen', 'Geschwindigkeit (km/h)']);
		const mapping: ColumnMapping = {
			time: { kind: 'iso', column: 'Zeit' },
			position: { kind: 'lngLat', lng: 'Längengrad', lat: 'Breitengrad' },
			spray: { kind: 'nozzles', columns: ['Düsen'] },
			decimalComma: true
		};
		const r = await read(latin1(text), mapping);
		expect(r.errors).toEqual([]);
		expect(r.fixes!.lng[0]).toBe(-98.515);
	});

	test('truncated last line is dropped with a warning naming the row', async () => {
		const cut = csv.slice(0, csv.length - 12);
		const r = await read(cut);
		expect(r.errors).toEqual([]);
		expect(r.fixes!.count).toBe(2);
		expect(r.warnings).toContainEqual(expect.objectContaining({ file: 'log.csv', row: 4, message: expect.stringMatching(/file looks cut off/) }));
	});

	test('a last line cut inside its last cell is dropped too', async () => {
		const r = await read(`${header}\n${rows[0]}\n${rows[1]}\n${rows[2].replace('10.8', '1x')}`, { ...base, speed: { column: 'speed', unit: 'km/h' } });
		expect(r.errors).toEqual([]);
		expect(r.fixes!.count).toBe(2);
		expect(r.warnings[0]).toMatchObject({ row: 4, message: expect.stringMatching(/unreadable 'speed' with no line end/) });
	});

	test('a truncated only row is fatal', async () => {
		const r = await read(`${header}\n${rows[0].slice(0, 30)}`);
		expect(r.fixes).toBeNull();
		expect(r.errors[0]).toMatchObject({ row: 2, message: 'has 2 columns; the header has 5' });
	});

	test('duplicate and out-of-order times come through untouched', async () => {
		const text = [header, rows[1], rows[0], rows[0], rows[2]].join('\r\n');
		const r = await read(text);
		expect(r.errors).toEqual([]);
		const t0 = Date.UTC(2024, 4, 14, 15) / 1000;
		expect([...r.fixes!.timeS]).toEqual([t0 + 1, t0, t0, t0 + 2]);
	});

	test('nozzle strings of the wrong length', async () => {
		const text = [header, rows[0], rows[1].replace('11000011', '1100001'), rows[2]].join('\n');
		const r = await read(text);
		expect(r.fixes).toBeNull();
		expect(r.errors).toEqual([{ file: 'log.csv', row: 3, column: 'nozzles', message: 'nozzle states have 7 characters; the machine has 8 nozzles' }]);
	});

	test('a nozzle string with other characters', async () => {
		const r = await read([header, rows[0].replace('10000001', '1000x001')].join('\n'));
		expect(r.errors[0]).toMatchObject({ row: 2, column: 'nozzles', message: "nozzle state 5 is 'x'; only 0 and 1 are allowed" });
	});

	test('non-numeric cells', async () => {
		const r = await read([header, rows[0], rows[1].replace('10.8', 'fast'), rows[2]].join('\n'), { ...base, speed: { column: 'speed', unit: 'km/h' } });
		expect(r.fixes).toBeNull();
		expect(r.errors).toEqual([{ file: 'log.csv', row: 3, column: 'speed', message: "'fast' is not a number" }]);
	});

	test('unparseable time', async () => {
		const r = await read([header, rows[0], rows[1].replace('2024-05-14T15:00:01Z', '2024-13-14T15:00:01Z')].join('\n') + '\n');
		expect(r.errors).toEqual([{ file: 'log.csv', row: 3, column: 'time', message: "time '2024-13-14T15:00:01Z' is not an ISO 8601 date and time" }]);
	});

	test('ISO offsets, epoch seconds, and separate date and time columns agree', async () => {
		const t0 = Date.UTC(2024, 4, 14, 15) / 1000;
		const iso = await read(`${header}\n2024-05-14T10:00:00.500-05:00,38.511,-98.515,10000001,1\n`);
		expect(iso.fixes!.timeS[0]).toBe(t0 + 0.5);
		const epoch = await read(`epoch,lat,lon,nozzles\n${t0},38.511,-98.515,10000001\n`, { ...base, time: { kind: 'epoch', column: 'epoch', unit: 's' } });
		expect(epoch.fixes!.timeS[0]).toBe(t0);
		const split = 'date,time,lat,lon,nozzles\n14/05/2024,15:00:00,38.511,-98.515,10000001\n';
		const h = await readLogHeader('log.csv', chunked(utf8(split), 64));
		expect(h.suggested.time).toEqual({ kind: 'dateAndTime', dateColumn: 'date', timeColumn: 'time', dateOrder: 'dmy' });
		const r = await read(split, h.suggested);
		expect(r.fixes!.timeS[0]).toBe(t0);
		expect(r.warnings[0].message).toMatch(/no UTC offset; they were read as UTC/);
	});

	test('US units convert with NIST SP 811 factors', async () => {
		const text = 'time,lat,lon,active_width_ft,speed_mph,rate_gpa,flow_gpm,press_psi,master\n2024-05-14T15:00:00Z,38.511,-98.515,60,10,15,20,40,off\n';
		const h = await readLogHeader('log.csv', chunked(utf8(text), 64));
		expect(h.suggested.spray).toEqual({ kind: 'activeWidth', column: 'active_width_ft', unit: 'ft' });
		expect(h.suggested.speed?.unit).toBe('mph');
		const mapping: ColumnMapping = {
			...h.suggested,
			rate: { column: 'rate_gpa', unit: 'gal/ac' },
			flow: { column: 'flow_gpm', unit: 'gal/min' },
			pressure: { column: 'press_psi', unit: 'psi' },
			master: { column: 'master' }
		};
		const r = await read(text, mapping);
		expect(r.errors).toEqual([]);
		const f = r.fixes!;
		// NIST SP 811 Appendix B: 1 ft = 0.3048 m, 1 mph = 0.44704 m/s, 1 gal = 3.785411784 L,
		// 1 acre = 4046.8564224 m2, 1 psi = 6894.757 Pa.
		expect(f.spray.kind === 'activeWidth' && f.spray.widthM[0]).toBeCloseTo(60 * 0.3048, 4);
		expect(f.speedMPerS![0]).toBeCloseTo(4.4704, 5);
		expect(f.rateLPerM2![0]).toBeCloseTo((15 * 3.785411784) / 4046.8564224, 9);
		expect(f.flowLPerS![0]).toBeCloseTo((20 * US_GALLON_L) / 60, 5);
		expect(f.pressurePa![0]).toBeCloseTo(40 * 6894.757, 0);
		expect(f.master![0]).toBe(0);
		expect(ACRE_M2).toBe(4046.8564224);
	});

	test('sprayed fraction in percent', async () => {
		const text = 'time,lat,lon,Sprayed Percent\n2024-05-14T15:00:00Z,38.511,-98.515,25\n2024-05-14T15:00:01Z,38.511,-98.515,101\n';
		const h = await readLogHeader('log.csv', chunked(utf8(text), 64));
		expect(h.suggested.spray).toEqual({ kind: 'fraction', column: 'Sprayed Percent', scale: 'percent' });
		const r = await read(text, h.suggested);
		expect(r.errors).toEqual([{ file: 'log.csv', row: 3, column: 'Sprayed Percent', message: 'sprayed fraction 101 is outside 0..100 %' }]);
	});

	test('quoted fields, tab delimiter and CRLF line ends', async () => {
		const text = 'time\tlat\tlon\tnozzles\tnote\r\n2024-05-14T15:00:00Z\t38.511\t-98.515\t10000001\t"a\tb ""quoted"""\r\n';
		const h = await readLogHeader('log.csv', chunked(utf8(text), 3));
		expect(h.delimiter).toBe('\t');
		expect(h.preview[0][4]).toBe('a\tb "quoted"');
		const r = await read(text, base, 3);
		expect(r.errors).toEqual([]);
		expect(r.fixes!.count).toBe(1);
	});

	test('errors beyond the cap are counted, and the import fails whole', async () => {
		const many = [header, ...Array.from({ length: 80 }, () => rows[0].replace('10000001', '1'))].join('\n') + '\n';
		const r = await read(many, base, 4096);
		expect(r.fixes).toBeNull();
		expect(r.errors).toHaveLength(51);
		expect(r.errors[50].message).toBe('and 30 more problems not listed');
	});
});

test('reading the header stops early and releases the source', async () => {
	let closed = false;
	let pulled = 0;
	async function* source() {
		try {
			yield utf8('time,lat,lon,nozzles\n');
			for (let i = 0; i < 10_000; i++) {
				pulled++;
				yield utf8(`2024-05-14T15:00:00Z,38.511,-98.515,10000001\n`.repeat(100));
			}
		} finally {
			closed = true;
		}
	}
	const h = await readLogHeader('log.csv', source());
	expect(h.preview).toHaveLength(20);
	expect(closed).toBe(true);
	expect(pulled).toBeLessThan(1000);
});
