// shpjs 6 ships no types; these are the two entry points used here (lib/index.js).
declare module 'shpjs' {
	import type { Geometry } from 'geojson';
	/** Records of a .shp, reprojected to WGS84 when a proj4 definition or WKT is given. */
	export function parseShp(shp: ArrayBufferView | ArrayBuffer, prj?: string | false): (Geometry | null)[];
	/** Records of a .dbf as objects; `cpg` is the code page text of the .cpg file. */
	export function parseDbf(dbf: ArrayBufferView | ArrayBuffer, cpg?: string): Record<string, unknown>[];
}
