// Which field each fix lies in. An interval belongs to the field of its start fix, so a field's
// list of fixes is also its list of intervals to draw (coverage's `starts`).
import type { MultiPolygon, Polygon, Position } from 'geojson';

export type FieldSplit = {
	/** Per field, in the order given: indices of the fixes inside it, ascending. */
	fixesByField: Uint32Array[];
	/** Per fix: the field index, or -1 outside every field. */
	fieldOfFix: Int32Array;
	outside: number;
};

// Edges bucketed in latitude bands so a point meets only the edges of its band.
const BANDS = 64;

type PreparedField = {
	minLng: number;
	minLat: number;
	maxLng: number;
	maxLat: number;
	/** Edges as [lng0, lat0, lng1, lat1] with lat0 < lat1 (horizontal edges never cross a ray). */
	edges: Float64Array;
	bandStart: Int32Array;
	bandEdges: Int32Array;
	bandH: number;
};

function prepare(geometry: Polygon | MultiPolygon, index: number): PreparedField {
	let rings: Position[][];
	if (geometry?.type === 'Polygon') rings = geometry.coordinates;
	else if (geometry?.type === 'MultiPolygon') rings = geometry.coordinates.flat();
	else throw new Error(`field ${index + 1}: expected a GeoJSON Polygon or MultiPolygon`);
	const list: number[] = [];
	let minLng = Infinity;
	let minLat = Infinity;
	let maxLng = -Infinity;
	let maxLat = -Infinity;
	for (const ring of rings) {
		for (let i = 0; i < ring.length; i++) {
			const a = ring[i];
			const b = ring[(i + 1) % ring.length];
			minLng = Math.min(minLng, a[0]);
			maxLng = Math.max(maxLng, a[0]);
			minLat = Math.min(minLat, a[1]);
			maxLat = Math.max(maxLat, a[1]);
			if (a[1] === b[1]) continue;
			if (a[1] < b[1]) list.push(a[0], a[1], b[0], b[1]);
			else list.push(b[0], b[1], a[0], a[1]);
		}
	}
	if (!Number.isFinite(minLng + minLat + maxLng + maxLat)) {
		throw new Error(`field ${index + 1}: the boundary has no finite coordinates`);
	}
	const edges = Float64Array.from(list);
	const count = edges.length / 4;
	const bandH = (maxLat - minLat) / BANDS || 1;
	const bandOf = (lat: number) => Math.min(BANDS - 1, Math.max(0, Math.floor((lat - minLat) / bandH)));
	const bandStart = new Int32Array(BANDS + 1);
	for (let e = 0; e < count; e++) {
		for (let b = bandOf(edges[4 * e + 1]); b <= bandOf(edges[4 * e + 3]); b++) bandStart[b + 1]++;
	}
	for (let b = 0; b < BANDS; b++) bandStart[b + 1] += bandStart[b];
	const bandEdges = new Int32Array(bandStart[BANDS]);
	const fill = bandStart.slice();
	for (let e = 0; e < count; e++) {
		for (let b = bandOf(edges[4 * e + 1]); b <= bandOf(edges[4 * e + 3]); b++) bandEdges[fill[b]++] = e;
	}
	return { minLng, minLat, maxLng, maxLat, edges, bandStart, bandEdges, bandH };
}

/** Even-odd point in polygon: holes and multipolygon parts without special cases. */
function contains(f: PreparedField, lng: number, lat: number): boolean {
	if (lng < f.minLng || lng > f.maxLng || lat < f.minLat || lat > f.maxLat) return false;
	const band = Math.min(BANDS - 1, Math.floor((lat - f.minLat) / f.bandH));
	const e = f.edges;
	let inside = false;
	for (let j = f.bandStart[band]; j < f.bandStart[band + 1]; j++) {
		const o = 4 * f.bandEdges[j];
		// Half-open in latitude, so a ray through a vertex counts once.
		if (e[o + 1] <= lat && lat < e[o + 3]) {
			const x = e[o] + ((lat - e[o + 1]) * (e[o + 2] - e[o])) / (e[o + 3] - e[o + 1]);
			if (lng < x) inside = !inside;
		}
	}
	return inside;
}

/**
 * Assigns each fix to the first field (in the given order) whose boundary contains it.
 * @example splitByField(fixes.lng, fixes.lat, fixes.count, fields.map((f) => f.boundary))
 */
export function splitByField(
	lng: Float64Array,
	lat: Float64Array,
	count: number,
	fields: (Polygon | MultiPolygon)[]
): FieldSplit {
	const prepared = fields.map(prepare);
	const fieldOfFix = new Int32Array(count);
	const counts = new Uint32Array(fields.length);
	let outside = 0;
	let last = -1;
	for (let i = 0; i < count; i++) {
		const x = lng[i];
		const y = lat[i];
		// Consecutive fixes are nearly always in the same field: try it first.
		let found = last >= 0 && contains(prepared[last], x, y) ? last : -1;
		if (found < 0) {
			for (let f = 0; f < prepared.length; f++) {
				if (f !== last && contains(prepared[f], x, y)) {
					found = f;
					break;
				}
			}
		}
		// Overlapping boundaries: the first field in the list wins, whatever the previous fix did.
		if (found > 0 && found === last) {
			for (let f = 0; f < found; f++) {
				if (contains(prepared[f], x, y)) {
					found = f;
					break;
				}
			}
		}
		fieldOfFix[i] = found;
		if (found < 0) outside++;
		else counts[found]++;
		if (found >= 0) last = found;
	}
	const fixesByField = Array.from(counts, (c) => new Uint32Array(c));
	const fill = new Uint32Array(fields.length);
	for (let i = 0; i < count; i++) {
		const f = fieldOfFix[i];
		if (f >= 0) fixesByField[f][fill[f]++] = i;
	}
	return { fixesByField, fieldOfFix, outside };
}
