// A field's zones for next season's targeted programme: GeoJSON (RFC 7946) and a zipped ESRI
// shapefile, the same attributes in both, units in the attribute names (rate_l_ha, area_ac, ...).
//
// The shapefile's geometry (.shp, .shx) comes from @mapbox/shp-write's low-level writer and its
// table (.dbf) from `dbf`, the package shp-write itself uses; we zip them with fflate and add a
// .prj (WGS84) and a .cpg (UTF-8). Not shp-write's own zip(), because it writes Polygon and
// MultiPolygon features to two files of the same name (the second replaces the first), types a
// column that is empty in every feature as text, writes text one UTF-16 code unit per byte and
// takes ring order as given, while the format wants outer rings clockwise. Not the cell exports'
// src/lib/export/shapefile.ts either: it lets the writer guess column types from the values, and
// a target-rate column not yet set in any zone must still be a number for a rate controller.
import { write as writeShapes } from '@mapbox/shp-write';
import { structure as dbfTable } from 'dbf';
import { zipSync, strToU8 } from 'fflate';
import type { Feature, FeatureCollection, MultiPolygon, Polygon, Position } from 'geojson';
import { fromSi } from '../compute/units';

export type ExportZone = {
	id: string;
	name: string;
	description: string;
	fieldName: string;
	areaM2: number;
	source: string;
	season: number | null;
	targetRateLPerM2: number | null;
	geometry: Polygon | MultiPolygon;
};

/** WGS 84 in the ESRI form of WKT that shapefile readers expect in a .prj. */
export const WGS84_PRJ =
	'GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]';

/** dBase field names hold at most 10 characters: these are the attribute names in both formats. */
export type ZoneAttributes = {
	zone_id: string;
	name: string;
	descr: string;
	field: string;
	source: string;
	season: number | null;
	area_ha: number;
	area_ac: number;
	/** Target spray liquid rate, L/ha and US gal/ac; null where none is set, 0 = leave unsprayed. */
	rate_l_ha: number | null;
	rate_galac: number | null;
};

const round = (v: number, d: number) => Number(v.toFixed(d));

export function zoneAttributes(z: ExportZone): ZoneAttributes {
	return {
		zone_id: z.id,
		name: z.name,
		descr: z.description,
		field: z.fieldName,
		source: z.source,
		season: z.season,
		area_ha: round(fromSi('area', z.areaM2, 'ha'), 3),
		area_ac: round(fromSi('area', z.areaM2, 'ac'), 3),
		rate_l_ha: z.targetRateLPerM2 === null ? null : round(fromSi('volumePerArea', z.targetRateLPerM2, 'L/ha'), 3),
		rate_galac: z.targetRateLPerM2 === null ? null : round(fromSi('volumePerArea', z.targetRateLPerM2, 'gal/ac'), 3)
	};
}

export function zonesGeojson(zones: ExportZone[]): FeatureCollection<Polygon | MultiPolygon, ZoneAttributes> {
	return {
		type: 'FeatureCollection',
		features: zones.map((z): Feature<Polygon | MultiPolygon, ZoneAttributes> => ({ type: 'Feature', id: z.id, properties: zoneAttributes(z), geometry: z.geometry }))
	};
}

// Column types and widths fixed here, so every column has its type even when all values are empty.
const DBF_FIELDS = [
	{ name: 'zone_id', type: 'C', size: 36 },
	{ name: 'name', type: 'C', size: 254 },
	{ name: 'descr', type: 'C', size: 254 },
	{ name: 'field', type: 'C', size: 254 },
	{ name: 'source', type: 'C', size: 10 },
	{ name: 'season', type: 'N', size: 18 },
	{ name: 'area_ha', type: 'N', size: 18 },
	{ name: 'area_ac', type: 'N', size: 18 },
	{ name: 'rate_l_ha', type: 'N', size: 18 },
	{ name: 'rate_galac', type: 'N', size: 18 }
] as const;

/** Text as UTF-8 bytes in a "binary string" (one char per byte), cut at a character boundary to fit. */
function utf8Field(text: string, maxBytes: number): string {
	let bytes = new TextEncoder().encode(text);
	if (bytes.length > maxBytes) {
		let end = maxBytes;
		while (end > 0 && (bytes[end] & 0xc0) === 0x80) end--;
		bytes = bytes.subarray(0, end);
	}
	let out = '';
	for (const b of bytes) out += String.fromCharCode(b);
	return out;
}

function signedArea(ring: Position[]): number {
	let a = 0;
	for (let i = 0; i + 1 < ring.length; i++) a += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
	return a / 2;
}

/** Shapefile ring order: outer rings clockwise, holes counter-clockwise (ESRI Shapefile Technical Description, 1998). */
function shapefileRings(g: Polygon | MultiPolygon): Position[][][] {
	const polygons = g.type === 'Polygon' ? [g.coordinates] : g.coordinates;
	return polygons.map((rings) =>
		rings.map((ring, i) => {
			const clockwise = signedArea(ring) < 0;
			return (i === 0) === clockwise ? ring : [...ring].reverse();
		})
	);
}

/**
 * The zones as a zipped shapefile: `<base>.shp/.shx/.dbf/.prj/.cpg`, polygons in WGS84.
 * @example zonesShapefile(zones, 'north-flat-zones') // Uint8Array of a .zip
 */
export function zonesShapefile(zones: ExportZone[], base: string): Uint8Array {
	if (zones.length === 0) throw new Error('zonesShapefile: there are no zones to write');
	const rows = zones.map((z) => {
		const a = zoneAttributes(z);
		return { ...a, zone_id: utf8Field(a.zone_id, 36), name: utf8Field(a.name, 254), descr: utf8Field(a.descr, 254), field: utf8Field(a.field, 254), source: utf8Field(a.source, 10) };
	});
	let files: { shp: DataView; shx: DataView } | undefined;
	// shp-write's writer takes each geometry's coordinates; a MultiPolygon's parts become rings of one record.
	writeShapes(rows, 'POLYGON', zones.map((z) => shapefileRings(z.geometry)), (err: unknown, written: { shp: DataView; shx: DataView }) => {
		if (err) throw err;
		files = written;
	});
	if (!files) throw new Error('zonesShapefile: the writer returned nothing');
	const table = dbfTable(rows, DBF_FIELDS.map((f) => ({ ...f })));
	const bytes = (v: DataView) => new Uint8Array(v.buffer, v.byteOffset, v.byteLength);
	return zipSync({
		[`${base}.shp`]: bytes(files.shp),
		[`${base}.shx`]: bytes(files.shx),
		[`${base}.dbf`]: bytes(table),
		[`${base}.prj`]: strToU8(WGS84_PRJ),
		[`${base}.cpg`]: strToU8('UTF-8')
	});
}
