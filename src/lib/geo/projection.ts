// A field's metric projection: its UTM zone on WGS84, the bulk projection of fixes into it, the
// point scale factor that turns projected areas back into ellipsoidal ones, and the field grid.
// UTM is the default because other GIS tools use it, so cells line up with theirs (DESIGN.md).
import proj4 from 'proj4';
import type { MultiPolygon, Polygon, Position } from 'geojson';
import type { GridSpec } from '../compute/types';

export type UtmZone = {
	zone: number;
	isSouth: boolean;
	/** 326xx (north) or 327xx (south). */
	epsg: number;
	/** proj4 definition. */
	proj: string;
	/** Central meridian, degrees. */
	centralMeridianDeg: number;
};

/** Rings in projected metres as flat [x0, y0, x1, y1, ...] arrays; even-odd rule (holes and parts). */
export type ProjectedRings = Float64Array[];

const WGS84_A = 6378137;
const WGS84_F = 1 / 298.257223563;
const UTM_K0 = 0.9996;

/**
 * The UTM zone containing a point, with the Norway (32V) and Svalbard (31X-37X) exceptions
 * that EPSG's zone definitions follow.
 * @example utmZoneForLngLat(-118.3, 47.1).epsg // 32611
 */
export function utmZoneForLngLat(lng: number, lat: number): UtmZone {
	if (!Number.isFinite(lng) || !Number.isFinite(lat) || Math.abs(lat) > 90 || Math.abs(lng) > 180) {
		throw new Error(`utmZoneForLngLat: [${lng}, ${lat}] is not a WGS84 [lng, lat] in degrees`);
	}
	let zone = Math.floor((lng + 180) / 6) + 1;
	if (zone > 60) zone = 60;
	if (lat >= 56 && lat < 64 && lng >= 3 && lng < 12) zone = 32;
	if (lat >= 72 && lat < 84) {
		if (lng >= 0 && lng < 9) zone = 31;
		else if (lng >= 9 && lng < 21) zone = 33;
		else if (lng >= 21 && lng < 33) zone = 35;
		else if (lng >= 33 && lng < 42) zone = 37;
	}
	const isSouth = lat < 0;
	return {
		zone,
		isSouth,
		epsg: (isSouth ? 32700 : 32600) + zone,
		proj: `+proj=utm +zone=${zone}${isSouth ? ' +south' : ''} +datum=WGS84 +units=m +no_defs`,
		centralMeridianDeg: zone * 6 - 183
	};
}

function outerRings(geometry: Polygon | MultiPolygon): Position[][] {
	if (geometry?.type === 'Polygon') return [geometry.coordinates[0]];
	if (geometry?.type === 'MultiPolygon') return geometry.coordinates.map((p) => p[0]);
	throw new Error(`expected a GeoJSON Polygon or MultiPolygon, got ${String((geometry as { type?: unknown })?.type)}`);
}

function allRings(geometry: Polygon | MultiPolygon): Position[][] {
	if (geometry?.type === 'Polygon') return geometry.coordinates;
	if (geometry?.type === 'MultiPolygon') return geometry.coordinates.flat();
	throw new Error(`expected a GeoJSON Polygon or MultiPolygon, got ${String((geometry as { type?: unknown })?.type)}`);
}

/**
 * Area-weighted centroid of the outer rings in plain degrees: good enough to pick a zone and a
 * scale factor (k varies by a few parts per million across a field).
 */
export function centroidLngLat(geometry: Polygon | MultiPolygon): [number, number] {
	let a = 0;
	let cx = 0;
	let cy = 0;
	let n = 0;
	let sx = 0;
	let sy = 0;
	for (const ring of outerRings(geometry)) {
		const [x0, y0] = ring[0];
		for (let i = 0; i + 1 < ring.length; i++) {
			const xi = ring[i][0] - x0;
			const yi = ring[i][1] - y0;
			const xj = ring[i + 1][0] - x0;
			const yj = ring[i + 1][1] - y0;
			const cross = xi * yj - xj * yi;
			a += cross;
			cx += (xi + xj) * cross + 3 * x0 * cross;
			cy += (yi + yj) * cross + 3 * y0 * cross;
			sx += ring[i][0];
			sy += ring[i][1];
			n++;
		}
	}
	if (n === 0) throw new Error('centroidLngLat: the polygon has no vertices');
	if (Math.abs(a) < 1e-18) return [sx / n, sy / n];
	return [cx / (3 * a), cy / (3 * a)];
}

/**
 * The UTM zone of a field, chosen from its centroid.
 * @example utmZoneFor(boundary).proj // '+proj=utm +zone=11 +datum=WGS84 +units=m +no_defs'
 */
export function utmZoneFor(geometry: Polygon | MultiPolygon): UtmZone {
	const [lng, lat] = centroidLngLat(geometry);
	return utmZoneForLngLat(lng, lat);
}

/**
 * Point scale factor k of UTM at a point (Snyder 1987, "Map Projections: A Working Manual",
 * eq. 8-11): projected lengths are ground lengths x k, projected areas are ellipsoidal areas x k^2.
 */
export function utmScaleFactor(zone: UtmZone, lng: number, lat: number): number {
	const e2 = WGS84_F * (2 - WGS84_F);
	const ep2 = e2 / (1 - e2);
	const phi = (lat * Math.PI) / 180;
	let dLng = lng - zone.centralMeridianDeg;
	if (dLng > 180) dLng -= 360;
	if (dLng < -180) dLng += 360;
	const cos = Math.cos(phi);
	const t = Math.tan(phi) ** 2;
	const c = ep2 * cos * cos;
	const a = ((dLng * Math.PI) / 180) * cos;
	const a2 = a * a;
	return (
		UTM_K0 *
		(1 +
			((1 + c) * a2) / 2 +
			((5 - 4 * t + 42 * c + 13 * c * c - 28 * ep2) * a2 * a2) / 24 +
			((61 - 148 * t + 16 * t * t) * a2 * a2 * a2) / 720)
	);
}

/** Scale factor at a field's centroid: one per field is enough (DESIGN.md, coverage-notes.md). */
export function fieldScaleFactor(geometry: Polygon | MultiPolygon, zone: UtmZone = utmZoneFor(geometry)): number {
	const [lng, lat] = centroidLngLat(geometry);
	return utmScaleFactor(zone, lng, lat);
}

const converters = new Map<string, proj4.Converter>();
function converterFor(proj: string): proj4.Converter {
	let c = converters.get(proj);
	if (!c) {
		c = proj4('WGS84', proj);
		converters.set(proj, c);
	}
	return c;
}

/**
 * Projects WGS84 [lng, lat] columns into `proj` (metres). With `indices`, only those entries
 * (and nothing else) are projected; the rest of the output stays NaN, so a field's fixes keep
 * the log's indexing.
 */
export function projectLngLat(
	proj: string,
	lng: Float64Array,
	lat: Float64Array,
	indices?: ArrayLike<number>
): { x: Float64Array; y: Float64Array } {
	const n = lng.length;
	if (lat.length !== n) throw new Error(`projectLngLat: ${n} longitudes but ${lat.length} latitudes`);
	const c = converterFor(proj);
	const x = new Float64Array(n);
	const y = new Float64Array(n);
	const pt: [number, number] = [0, 0];
	const one = (i: number) => {
		pt[0] = lng[i];
		pt[1] = lat[i];
		const p = c.forward(pt);
		x[i] = p[0];
		y[i] = p[1];
	};
	if (indices) {
		x.fill(NaN);
		y.fill(NaN);
		for (let j = 0; j < indices.length; j++) one(indices[j]);
	} else {
		for (let i = 0; i < n; i++) one(i);
	}
	return { x, y };
}

/** Projects every ring of a Polygon or MultiPolygon (outer rings and holes) into `proj`. */
export function projectRings(proj: string, geometry: Polygon | MultiPolygon): ProjectedRings {
	const c = converterFor(proj);
	return allRings(geometry).map((ring) => {
		const out = new Float64Array(ring.length * 2);
		for (let i = 0; i < ring.length; i++) {
			const p = c.forward([ring[i][0], ring[i][1]]);
			out[2 * i] = p[0];
			out[2 * i + 1] = p[1];
		}
		return out;
	});
}

/**
 * Planar area of even-odd rings, m2 in projected units (divide by k^2 for the ellipsoid). Holes
 * subtract whatever their winding, as long as they lie inside their outer ring.
 */
export function projectedAreaM2(rings: ProjectedRings): number {
	let total = 0;
	rings.forEach((r, idx) => {
		let a = 0;
		const n = r.length >> 1;
		for (let i = 0; i < n; i++) {
			const j = (i + 1) % n;
			a += (r[2 * i] - r[0]) * (r[2 * j + 1] - r[1]) - (r[2 * j] - r[0]) * (r[2 * i + 1] - r[1]);
		}
		total += Math.abs(a / 2) * (ringInsideOthers(rings, idx) ? -1 : 1);
	});
	return total;
}

function ringInsideOthers(rings: ProjectedRings, idx: number): boolean {
	const r = rings[idx];
	const px = r[0];
	const py = r[1];
	let inside = false;
	rings.forEach((o, j) => {
		if (j === idx) return;
		const n = o.length >> 1;
		for (let i = 0, k = n - 1; i < n; k = i++) {
			const yi = o[2 * i + 1];
			const yk = o[2 * k + 1];
			if (yi > py !== yk > py) {
				const xi = o[2 * i];
				const xk = o[2 * k];
				if (px < ((xk - xi) * (py - yi)) / (yk - yi) + xi) inside = !inside;
			}
		}
	});
	return inside;
}

/**
 * A field's grid: its UTM zone, square cells of `cellSizeM` with the origin at a multiple of
 * the cell size (so the same cell is the same ground in every season), covering the projected
 * bounding box.
 * @example gridSpecFor(boundary) // { proj: '+proj=utm +zone=11 ...', epsg: 32611, cellSizeM: 10, ... }
 */
export function gridSpecFor(
	geometry: Polygon | MultiPolygon,
	{ cellSizeM = 10, zone = utmZoneFor(geometry) }: { cellSizeM?: number; zone?: UtmZone } = {}
): GridSpec {
	if (!(cellSizeM > 0) || !Number.isFinite(cellSizeM)) {
		throw new Error(`gridSpecFor: cellSizeM must be a positive number of metres, got ${cellSizeM}`);
	}
	const rings = projectRings(zone.proj, geometry);
	let minX = Infinity;
	let minY = Infinity;
	let maxX = -Infinity;
	let maxY = -Infinity;
	for (const r of rings) {
		for (let i = 0; i < r.length; i += 2) {
			minX = Math.min(minX, r[i]);
			maxX = Math.max(maxX, r[i]);
			minY = Math.min(minY, r[i + 1]);
			maxY = Math.max(maxY, r[i + 1]);
		}
	}
	if (!Number.isFinite(minX)) throw new Error('gridSpecFor: the boundary has no finite coordinates');
	const originX = Math.floor(minX / cellSizeM) * cellSizeM;
	const originY = Math.floor(minY / cellSizeM) * cellSizeM;
	return {
		proj: zone.proj,
		epsg: zone.epsg,
		cellSizeM,
		originX,
		originY,
		cols: Math.max(1, Math.ceil((maxX - originX) / cellSizeM)),
		rows: Math.max(1, Math.ceil((maxY - originY) / cellSizeM))
	};
}
