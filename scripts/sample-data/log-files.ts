// The sprayer's own file formats (invented header names, no vendor's), and the column mapping a
// user would confirm for each: CSV, GeoJSON points, and a zipped point shapefile whose nozzle
// states are split over two 72-character text attributes (a dBase text field holds at most 254).
import type { ColumnMapping } from '../../src/lib/ingest/mapping';
import type { FixTable } from './drive';
import { toLngLat } from './frame';
import type { LogFormat } from './schedule';
import { dbf, pointShp, WGS84_PRJ, zipFixed, type DbfField } from './shapefile';

const CSV_HEADER = ['utc_time', 'boom_lat', 'boom_lon', 'ground_speed_kmh', 'heading_deg', 'master_on', 'rate_l_ha', 'nozzle_states'];

export function mappingFor(format: LogFormat, nozzleCount: number): ColumnMapping {
	if (format === 'csv')
		return {
			time: { kind: 'iso', column: 'utc_time' },
			position: { kind: 'lngLat', lng: 'boom_lon', lat: 'boom_lat' },
			spray: { kind: 'nozzles', columns: ['nozzle_states'] },
			speed: { column: 'ground_speed_kmh', unit: 'km/h' },
			heading: { column: 'heading_deg' },
			master: { column: 'master_on' },
			rate: { column: 'rate_l_ha', unit: 'L/ha' }
		};
	if (format === 'geojson')
		return {
			time: { kind: 'iso', column: 'utc_time' },
			position: { kind: 'geometry', crs: null },
			spray: { kind: 'nozzles', columns: ['nozzle_states'] },
			speed: { column: 'speed_kmh', unit: 'km/h' },
			heading: { column: 'heading_deg' },
			master: { column: 'master_on' },
			rate: { column: 'rate_l_ha', unit: 'L/ha' }
		};
	if (nozzleCount !== 144) throw new Error('the shapefile layout splits exactly 144 nozzles over two attributes');
	return {
		time: { kind: 'iso', column: 'UTC_TIME' },
		position: { kind: 'geometry', crs: null },
		spray: { kind: 'nozzles', columns: ['NOZZLES_A', 'NOZZLES_B'] },
		speed: { column: 'SPEED_KMH', unit: 'km/h' },
		heading: { column: 'HEADING' },
		master: { column: 'MASTER_ON' },
		rate: { column: 'RATE_L_HA', unit: 'L/ha' }
	};
}

/** One '0'/'1' character per nozzle, left to right looking in the direction of travel. */
function nozzleStrings(t: FixTable): (i: number) => string {
	const nSensors = Math.ceil(t.nozzleCount / t.nozzlesPerSensor);
	const on = '1'.repeat(t.nozzlesPerSensor);
	const off = '0'.repeat(t.nozzlesPerSensor);
	const parts = new Array<string>(nSensors);
	return (i) => {
		for (let s = 0; s < nSensors; s++) parts[s] = t.sensors[i * nSensors + s] ? on : off;
		return parts.join('').slice(0, t.nozzleCount);
	};
}

function lngLatColumns(t: FixTable): { lng: Float64Array; lat: Float64Array } {
	const lng = new Float64Array(t.count);
	const lat = new Float64Array(t.count);
	for (let i = 0; i < t.count; i++) {
		const [x, y] = toLngLat(t.e[i], t.n[i]);
		// 1e-8 degrees is about 1 mm: below the GNSS noise, and the same text as the CSV.
		lng[i] = Math.round(x * 1e8) / 1e8;
		lat[i] = Math.round(y * 1e8) / 1e8;
	}
	return { lng, lat };
}

const iso = (ms: number) => new Date(ms).toISOString();

function csv(t: FixTable): Uint8Array {
	const { lng, lat } = lngLatColumns(t);
	const nozzles = nozzleStrings(t);
	const lines: string[] = [CSV_HEADER.join(',')];
	for (let i = 0; i < t.count; i++)
		lines.push(
			`${iso(t.timeMs[i])},${lat[i].toFixed(8)},${lng[i].toFixed(8)},${t.speedKmh[i].toFixed(2)},${t.headingDeg[i].toFixed(1)},${t.master[i]},${t.rateLPerHa[i].toFixed(1)},${nozzles(i)}`
		);
	return Buffer.from(lines.join('\n') + '\n', 'latin1');
}

function geojson(t: FixTable): Uint8Array {
	const { lng, lat } = lngLatColumns(t);
	const nozzles = nozzleStrings(t);
	const features: string[] = [];
	for (let i = 0; i < t.count; i++)
		features.push(
			`{"type":"Feature","geometry":{"type":"Point","coordinates":[${lng[i].toFixed(8)},${lat[i].toFixed(8)}]},"properties":{"utc_time":"${iso(t.timeMs[i])}","speed_kmh":${t.speedKmh[i].toFixed(2)},"heading_deg":${t.headingDeg[i].toFixed(1)},"master_on":${t.master[i]},"rate_l_ha":${t.rateLPerHa[i].toFixed(1)},"nozzle_states":"${nozzles(i)}"}}`
		);
	return Buffer.from(`{"type":"FeatureCollection","features":[\n${features.join(',\n')}\n]}\n`, 'latin1');
}

const SHP_FIELDS: DbfField[] = [
	{ name: 'UTC_TIME', type: 'C', length: 24 },
	{ name: 'SPEED_KMH', type: 'N', length: 6, decimals: 2 },
	{ name: 'HEADING', type: 'N', length: 5, decimals: 1 },
	{ name: 'MASTER_ON', type: 'N', length: 1 },
	{ name: 'RATE_L_HA', type: 'N', length: 6, decimals: 1 },
	{ name: 'NOZZLES_A', type: 'C', length: 72 },
	{ name: 'NOZZLES_B', type: 'C', length: 72 }
];

function shapefile(t: FixTable, layer: string): Uint8Array {
	const { lng, lat } = lngLatColumns(t);
	const nozzles = nozzleStrings(t);
	const rows: (string | number)[][] = [];
	for (let i = 0; i < t.count; i++) {
		const bits = nozzles(i);
		rows.push([iso(t.timeMs[i]), t.speedKmh[i], t.headingDeg[i], t.master[i], t.rateLPerHa[i], bits.slice(0, 72), bits.slice(72)]);
	}
	const { shp, shx } = pointShp(lng, lat);
	return zipFixed({
		[`${layer}.shp`]: shp,
		[`${layer}.shx`]: shx,
		[`${layer}.dbf`]: dbf(SHP_FIELDS, rows),
		[`${layer}.prj`]: WGS84_PRJ,
		[`${layer}.cpg`]: 'UTF-8'
	});
}

export function renderLog(format: LogFormat, file: string, t: FixTable): Uint8Array {
	if (format === 'csv') return csv(t);
	if (format === 'geojson') return geojson(t);
	return shapefile(t, file.replace(/\.zip$/, ''));
}
