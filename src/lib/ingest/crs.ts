// Coordinate reference systems the readers accept: EPSG codes built by formula for the ones farms
// meet (UTM on WGS84 and NAD83, web mercator), or any proj4 definition / WKT a file carries.
import proj4 from 'proj4';

/** proj4 definition for an EPSG code, or null when it is not one we can build. */
export function epsgToProj4(epsg: number): string | null {
	if (!Number.isInteger(epsg)) return null;
	if (epsg === 4326) return '+proj=longlat +datum=WGS84 +no_defs';
	// NAD83 and WGS84 differ by about a metre; treated alike, as web maps do.
	if (epsg === 4269) return '+proj=longlat +datum=NAD83 +no_defs';
	if (epsg === 3857)
		return '+proj=merc +a=6378137 +b=6378137 +lat_ts=0 +lon_0=0 +x_0=0 +y_0=0 +k=1 +units=m +nadgrids=@null +wktext +no_defs';
	const zone = epsg % 100;
	if (epsg >= 32601 && epsg <= 32660) return `+proj=utm +zone=${zone} +datum=WGS84 +units=m +no_defs`;
	if (epsg >= 32701 && epsg <= 32760) return `+proj=utm +zone=${zone} +south +datum=WGS84 +units=m +no_defs`;
	// EPSG 26901-26923: NAD83 / UTM zones 1N-23N.
	if (epsg >= 26901 && epsg <= 26923) return `+proj=utm +zone=${zone} +datum=NAD83 +units=m +no_defs`;
	return null;
}

export type ToWgs84 = (xy: [number, number]) => [number, number];

/** A function from projected x/y to WGS84 [lng, lat], from an EPSG code, a proj4 string or WKT.
 * Throws an Error naming the CRS when proj4 cannot use it. */
export function makeToWgs84(crs: number | string): ToWgs84 {
	const def = typeof crs === 'number' ? epsgToProj4(crs) : crs.trim();
	if (!def) throw new Error(`EPSG:${crs} is not supported; give a proj4 definition instead`);
	let converter: proj4.Converter;
	try {
		converter = proj4(def, 'EPSG:4326');
	} catch (err) {
		const what = typeof crs === 'number' ? `EPSG:${crs}` : 'the coordinate system definition';
		throw new Error(`${what} could not be used (${err instanceof Error ? err.message : err})`);
	}
	return (xy) => converter.forward(xy) as [number, number];
}

/** True when a coordinate pair is plausible WGS84 degrees. */
export function isPlausibleDegrees(x: number, y: number): boolean {
	return Number.isFinite(x) && Number.isFinite(y) && Math.abs(x) <= 180 && Math.abs(y) <= 90;
}
