// A zipped ESRI shapefile of polygons in WGS84: .shp/.shx/.dbf written by @mapbox/shp-write,
// plus .prj, a .cpg naming the text encoding, and a text file that lists every attribute with
// its meaning and unit (DBF names stop at ten characters, too short to carry units in words).
import { write as writeShapefile } from '@mapbox/shp-write';
import { rewind } from '@turf/turf';
import { strToU8, zipSync } from 'fflate';
import type { Feature, FeatureCollection, MultiPolygon, Polygon } from 'geojson';

export type Attribute = { name: string; description: string; unit?: string };

/** WGS 84 in the ESRI flavour of WKT that shapefile readers expect in a .prj. */
const WGS84_PRJ =
	'GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["Degree",0.017453292519943295]]';

// The DBF writer stores one byte per UTF-16 code unit; handing it UTF-8 bytes as characters keeps
// every name intact, and the .cpg tells readers to decode them as UTF-8.
const utf8Bytes = (s: string) => String.fromCharCode(...new TextEncoder().encode(s));

function dataViewBytes(view: DataView): Uint8Array {
	return new Uint8Array(view.buffer, view.byteOffset, view.byteLength);
}

/** The files of a polygon shapefile named `base`, zipped; features keep only the listed attributes. */
export function shapefileZip(base: string, fc: FeatureCollection<Polygon | MultiPolygon>, attributes: Attribute[]): Uint8Array {
	for (const a of attributes) if (a.name.length > 10) throw new Error(`shapefileZip: attribute '${a.name}' is longer than the DBF's ten characters`);
	if (fc.features.length === 0) throw new Error('shapefileZip: nothing to write');
	// Shapefiles want outer rings clockwise and holes anticlockwise, the reverse of RFC 7946.
	const features = fc.features.map((f) => rewind(f as Feature<Polygon | MultiPolygon>, { reverse: true }) as Feature<Polygon | MultiPolygon>);
	const rings = features.map((f) => (f.geometry.type === 'Polygon' ? f.geometry.coordinates : f.geometry.coordinates.flat()));
	const rows = features.map((f) =>
		Object.fromEntries(
			attributes.map((a) => {
				const v = f.properties?.[a.name];
				return [a.name, typeof v === 'string' ? utf8Bytes(v) : v ?? null];
			})
		)
	);
	let files: { shp: DataView; shx: DataView; dbf: DataView } | null = null;
	writeShapefile(rows, 'POLYGON', rings, (err, out) => {
		if (err) throw err;
		files = out;
	});
	if (!files) throw new Error('shapefileZip: the writer returned nothing');
	const { shp, shx, dbf } = files as { shp: DataView; shx: DataView; dbf: DataView };
	const width = Math.max(...attributes.map((a) => a.name.length));
	const readme = [
		`${base}: ${features.length} polygons, WGS 84 longitude/latitude (EPSG:4326).`,
		'',
		'Attributes:',
		...attributes.map((a) => `  ${a.name.padEnd(width)}  ${a.description}${a.unit ? ` [${a.unit}]` : ''}`),
		''
	].join('\r\n');
	return zipSync({
		[`${base}.shp`]: dataViewBytes(shp),
		[`${base}.shx`]: dataViewBytes(shx),
		[`${base}.dbf`]: dataViewBytes(dbf),
		[`${base}.prj`]: strToU8(WGS84_PRJ),
		[`${base}.cpg`]: strToU8('UTF-8'),
		[`${base}.txt`]: strToU8(readme)
	});
}
