// A small ESRI shapefile writer (points and polygons, dBase III attributes) after the ESRI
// Shapefile Technical Description (1998). Written here rather than with a library because the
// demo must come out byte for byte the same on every run: the .dbf header date and the zip
// entry times are fixed instead of "now".
import { zipSync } from 'fflate';

export type DbfField = { name: string; type: 'C' | 'N'; length: number; decimals?: number };

/** Fixed "last update" for every .dbf and zip entry of the demo. */
const DEMO_DATE = { year: 2026, month: 1, day: 1 };

export const WGS84_PRJ =
	'GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]';

type Bbox = [number, number, number, number];

function bboxOf(points: Iterable<[number, number]>): Bbox {
	const b: Bbox = [Infinity, Infinity, -Infinity, -Infinity];
	for (const [x, y] of points) {
		b[0] = Math.min(b[0], x);
		b[1] = Math.min(b[1], y);
		b[2] = Math.max(b[2], x);
		b[3] = Math.max(b[3], y);
	}
	return b;
}

function header(view: DataView, shapeType: number, lengthBytes: number, bbox: Bbox): void {
	view.setInt32(0, 9994, false);
	view.setInt32(24, lengthBytes / 2, false);
	view.setInt32(28, 1000, true);
	view.setInt32(32, shapeType, true);
	for (let k = 0; k < 4; k++) view.setFloat64(36 + 8 * k, bbox[k], true);
}

/** Records of shape type 1 (Point). */
export function pointShp(lng: Float64Array, lat: Float64Array): { shp: Uint8Array; shx: Uint8Array } {
	const n = lng.length;
	const shp = new Uint8Array(100 + n * 28);
	const shx = new Uint8Array(100 + n * 8);
	const sv = new DataView(shp.buffer);
	const xv = new DataView(shx.buffer);
	const bbox = bboxOf((function* () {
		for (let i = 0; i < n; i++) yield [lng[i], lat[i]] as [number, number];
	})());
	header(sv, 1, shp.length, bbox);
	header(xv, 1, shx.length, bbox);
	for (let i = 0; i < n; i++) {
		const o = 100 + i * 28;
		sv.setInt32(o, i + 1, false);
		sv.setInt32(o + 4, 10, false);
		sv.setInt32(o + 8, 1, true);
		sv.setFloat64(o + 12, lng[i], true);
		sv.setFloat64(o + 20, lat[i], true);
		xv.setInt32(100 + i * 8, o / 2, false);
		xv.setInt32(104 + i * 8, 10, false);
	}
	return { shp, shx };
}

/** Records of shape type 5 (Polygon). Each record is a list of closed rings, outer rings
 * clockwise and holes counter-clockwise as the format requires. */
export function polygonShp(records: [number, number][][][]): { shp: Uint8Array; shx: Uint8Array } {
	const sizes = records.map((rings) => 44 + 4 * rings.length + 16 * rings.reduce((s, r) => s + r.length, 0));
	const shp = new Uint8Array(100 + sizes.reduce((s, x) => s + 8 + x, 0));
	const shx = new Uint8Array(100 + records.length * 8);
	const sv = new DataView(shp.buffer);
	const xv = new DataView(shx.buffer);
	const bbox = bboxOf(records.flat(2));
	header(sv, 5, shp.length, bbox);
	header(xv, 5, shx.length, bbox);
	let o = 100;
	records.forEach((rings, i) => {
		xv.setInt32(100 + i * 8, o / 2, false);
		xv.setInt32(104 + i * 8, sizes[i] / 2, false);
		sv.setInt32(o, i + 1, false);
		sv.setInt32(o + 4, sizes[i] / 2, false);
		sv.setInt32(o + 8, 5, true);
		const b = bboxOf(rings.flat());
		for (let k = 0; k < 4; k++) sv.setFloat64(o + 12 + 8 * k, b[k], true);
		sv.setInt32(o + 44, rings.length, true);
		sv.setInt32(o + 48, rings.reduce((s, r) => s + r.length, 0), true);
		let p = o + 52;
		let start = 0;
		for (const r of rings) {
			sv.setInt32(p, start, true);
			p += 4;
			start += r.length;
		}
		for (const r of rings)
			for (const [x, y] of r) {
				sv.setFloat64(p, x, true);
				sv.setFloat64(p + 8, y, true);
				p += 16;
			}
		o += 8 + sizes[i];
	});
	return { shp, shx };
}

/** dBase III table; text is written as ASCII (the demo writes nothing else). */
export function dbf(fields: DbfField[], rows: (string | number)[][]): Uint8Array {
	const recordLength = 1 + fields.reduce((s, f) => s + f.length, 0);
	const headerLength = 32 + 32 * fields.length + 1;
	const out = new Uint8Array(headerLength + rows.length * recordLength + 1);
	const v = new DataView(out.buffer);
	out[0] = 0x03;
	out[1] = DEMO_DATE.year - 1900;
	out[2] = DEMO_DATE.month;
	out[3] = DEMO_DATE.day;
	v.setUint32(4, rows.length, true);
	v.setUint16(8, headerLength, true);
	v.setUint16(10, recordLength, true);
	fields.forEach((f, i) => {
		const o = 32 + 32 * i;
		if (f.name.length > 10) throw new Error(`dBase field name "${f.name}" is longer than 10 characters`);
		for (let k = 0; k < f.name.length; k++) out[o + k] = f.name.charCodeAt(k);
		out[o + 11] = f.type.charCodeAt(0);
		out[o + 16] = f.length;
		out[o + 17] = f.decimals ?? 0;
	});
	out[headerLength - 1] = 0x0d;
	let o = headerLength;
	for (const row of rows) {
		out[o++] = 0x20;
		fields.forEach((f, k) => {
			const value = row[k];
			let text = f.type === 'N' ? (value as number).toFixed(f.decimals ?? 0) : String(value);
			if (text.length > f.length) throw new Error(`value "${text}" does not fit dBase field ${f.name} (${f.length})`);
			text = f.type === 'N' ? text.padStart(f.length, ' ') : text.padEnd(f.length, ' ');
			for (let c = 0; c < f.length; c++) out[o + c] = text.charCodeAt(c);
			o += f.length;
		});
	}
	out[o] = 0x1a;
	return out;
}

/** Zip with fixed entry times, so the bytes do not depend on when or where it was made. */
export function zipFixed(entries: Record<string, Uint8Array | string>): Uint8Array {
	// DOS times are local wall-clock fields; a Date built from local fields gives the same fields
	// back whatever the machine's time zone.
	const mtime = new Date(DEMO_DATE.year, DEMO_DATE.month - 1, DEMO_DATE.day, 0, 0, 0);
	const files: Record<string, [Uint8Array, { mtime: Date }]> = {};
	for (const [name, data] of Object.entries(entries))
		files[name] = [typeof data === 'string' ? new TextEncoder().encode(data) : data, { mtime }];
	return zipSync(files, { level: 6 });
}
