// Zone geometry: every zone lies inside its field and overlaps no other zone of the field, so
// the zones and the rest of the field split it exactly and their figures add up to the field's.
// A shape that reaches outside the field or into another zone is cut back (the other zone keeps
// its ground) and the cut is reported; a shape with nothing left is refused.
import { difference, featureCollection, intersect } from '@turf/turf';
import type { Feature, MultiPolygon, Polygon, Position } from 'geojson';
import proj4 from 'proj4';
import type { GridSpec } from '../compute/types';
import { areaM2 } from './area';
import { cellsToPolygons, type CellRef } from './zone-cells';

export type ZoneGeometry = Polygon | MultiPolygon;

/** Parts smaller than this that cutting leaves behind (slivers along a shared edge) are dropped. */
export const MIN_PART_M2 = 1;
/** Hotspot zones: defaults for the smallest zone kept and the buffer around the cells. Common practice, no source. */
export const DEFAULT_MIN_AREA_M2 = 500;
export const DEFAULT_BUFFER_M = 5;
export const MAX_BUFFER_M = 50;
export const MAX_MIN_AREA_M2 = 1e6;

const feature = (geometry: ZoneGeometry): Feature<ZoneGeometry> => ({ type: 'Feature', properties: {}, geometry });

function polygonsOf(g: ZoneGeometry): Position[][][] {
	return g.type === 'Polygon' ? [g.coordinates] : g.coordinates;
}

function fromPolygons(polygons: Position[][][]): ZoneGeometry | null {
	if (polygons.length === 0) return null;
	return polygons.length === 1 ? { type: 'Polygon', coordinates: polygons[0] } : { type: 'MultiPolygon', coordinates: polygons };
}

function mapPositions(g: ZoneGeometry, f: (p: Position) => Position): ZoneGeometry {
	return fromPolygons(polygonsOf(g).map((rings) => rings.map((ring) => ring.map(f))))!;
}

/**
 * The plane zones are cut in: the field grid's projection (its UTM zone), shifted to a local
 * origin so the clipper works on small numbers. The coverage engine draws fields and zones with
 * straight edges in this projection, so cutting here puts a zone's edge exactly on the field's
 * edge as the engine sees it (a straight edge in degrees can lie centimetres off it).
 */
export type Plane = {
	toPlane(g: ZoneGeometry): ZoneGeometry;
	toLngLat(g: ZoneGeometry): ZoneGeometry;
	/** Coordinates already in `proj` (metres) into the plane. */
	fromProjected(g: ZoneGeometry): ZoneGeometry;
};

export function planeFor(proj: string, near: ZoneGeometry): Plane {
	const c = proj4('WGS84', proj);
	const [ox, oy] = c.forward(polygonsOf(near)[0][0][0] as [number, number]);
	const r = (v: number) => Math.round(v * 1e9) / 1e9;
	return {
		toPlane: (g) => mapPositions(g, ([lng, lat]) => {
			const [x, y] = c.forward([lng, lat]);
			return [x - ox, y - oy];
		}),
		toLngLat: (g) => mapPositions(g, ([x, y]) => {
			const [lng, lat] = c.inverse([x + ox, y + oy]);
			return [r(lng), r(lat)];
		}),
		fromProjected: (g) => mapPositions(g, ([x, y]) => [x - ox, y - oy])
	};
}

/** Planar area of a projected geometry (holes subtracted), for telling slivers. */
function planarArea(g: ZoneGeometry): number {
	let total = 0;
	for (const rings of polygonsOf(g)) {
		rings.forEach((ring, i) => {
			let a = 0;
			for (let k = 0; k + 1 < ring.length; k++) a += ring[k][0] * ring[k + 1][1] - ring[k + 1][0] * ring[k][1];
			total += (i === 0 ? 1 : -1) * Math.abs(a / 2);
		});
	}
	return total;
}

/** The projected geometry without parts under MIN_PART_M2, or null when nothing is left. */
function dropSlivers(g: ZoneGeometry | null): ZoneGeometry | null {
	if (!g) return null;
	return fromPolygons(polygonsOf(g).filter((p) => planarArea({ type: 'Polygon', coordinates: p }) >= MIN_PART_M2));
}

function bbox(g: ZoneGeometry): [number, number, number, number] {
	let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
	for (const rings of polygonsOf(g)) for (const [x, y] of rings[0] ?? []) {
		w = Math.min(w, x); e = Math.max(e, x);
		s = Math.min(s, y); n = Math.max(n, y);
	}
	return [w, s, e, n];
}

function boxesMeet(a: [number, number, number, number], b: [number, number, number, number]) {
	return a[0] <= b[2] && b[0] <= a[2] && a[1] <= b[3] && b[1] <= a[3];
}

/** Intersection of two geometries in one plane (degrees or projected metres); null when empty. */
export function intersection(a: ZoneGeometry, b: ZoneGeometry): ZoneGeometry | null {
	if (!boxesMeet(bbox(a), bbox(b))) return null;
	return (intersect(featureCollection([feature(a), feature(b)]))?.geometry as ZoneGeometry | undefined) ?? null;
}

/** `a` less every one of `others`, in one plane; null when nothing is left. */
export function minus(a: ZoneGeometry, others: ZoneGeometry[]): ZoneGeometry | null {
	const box = bbox(a);
	const near = others.filter((o) => boxesMeet(box, bbox(o)));
	if (near.length === 0) return a;
	return (difference(featureCollection([feature(a), ...near.map(feature)]))?.geometry as ZoneGeometry | undefined) ?? null;
}

export type Neighbour = { name: string; geometry: ZoneGeometry };

export type Clipped =
	| {
			ok: true;
			/** WGS84 [lng, lat]. */
			geometry: ZoneGeometry;
			/** Ellipsoidal area (GeographicLib) of what is kept. */
			areaM2: number;
			/** What was cut off: outside the field, and inside each other zone (by name). */
			outsideM2: number;
			overlaps: { name: string; areaM2: number }[];
	  }
	| { ok: false; error: string };

/**
 * A zone shape (WGS84) cut to its field and clear of the other zones of the field, in the field
 * grid's projection `proj`.
 * @example clipZone(drawn, field.boundary, otherZones, field.gridProj) // { ok: true, geometry, areaM2, outsideM2: 0, overlaps: [] }
 */
export function clipZone(shape: ZoneGeometry, boundary: ZoneGeometry, others: Neighbour[], proj: string): Clipped {
	const plane = planeFor(proj, boundary);
	return clipInPlane(plane, plane.toPlane(shape), areaM2(shape), plane.toPlane(boundary), others.map((o) => ({ name: o.name, geometry: plane.toPlane(o.geometry) })));
}

function clipInPlane(plane: Plane, shape: ZoneGeometry, shapeAreaM2: number, boundary: ZoneGeometry, others: Neighbour[]): Clipped {
	const inField = dropSlivers(intersection(shape, boundary));
	if (!inField) return { ok: false, error: 'the shape lies outside the field' };
	const outsideM2 = Math.max(0, shapeAreaM2 - areaM2(plane.toLngLat(inField)));
	const overlaps: { name: string; areaM2: number }[] = [];
	const touching: ZoneGeometry[] = [];
	for (const o of others) {
		const shared = intersection(inField, o.geometry);
		if (shared && planarArea(shared) >= MIN_PART_M2 / 100) {
			overlaps.push({ name: o.name, areaM2: areaM2(plane.toLngLat(shared)) });
			touching.push(o.geometry);
		}
	}
	const kept = touching.length ? dropSlivers(minus(inField, touching)) : inField;
	if (!kept) {
		const names = overlaps.map((o) => `“${o.name}”`).join(', ');
		return { ok: false, error: `the shape lies wholly inside ${overlaps.length === 1 ? 'zone' : 'zones'} ${names}` };
	}
	const geometry = plane.toLngLat(kept);
	return { ok: true, geometry, areaM2: areaM2(geometry), outsideM2, overlaps };
}

/** A sentence on what clipping cut off, or '' when nothing was: shown when a zone is saved or previewed. */
export function clipNote(c: { outsideM2: number; overlaps: { name: string; areaM2: number }[] }, formatArea: (m2: number) => string): string {
	const parts: string[] = [];
	if (c.outsideM2 >= MIN_PART_M2 / 100) parts.push(`${formatArea(c.outsideM2)} outside the field`);
	for (const o of c.overlaps) parts.push(`${formatArea(o.areaM2)} already in “${o.name}”`);
	return parts.length ? `Cut off: ${parts.join(', ')}.` : '';
}

export type HotspotZoneOptions = {
	cells: CellRef[];
	grid: GridSpec;
	boundary: ZoneGeometry;
	existing: Neighbour[];
	bufferM: number;
	minAreaM2: number;
};

export type HotspotZone = {
	geometry: ZoneGeometry;
	areaM2: number;
	/** Hotspot cells whose centre lies in the zone. */
	cells: CellRef[];
	outsideM2: number;
	overlaps: { name: string; areaM2: number }[];
};

export type HotspotZones = {
	zones: HotspotZone[];
	/** Patches left out: smaller than the minimum area after clipping, or wholly inside existing zones. */
	tooSmall: number;
	insideExisting: number;
};

/**
 * Neighbouring hotspot cells merged into zones: the cells grown by the buffer and unioned in the
 * grid's projection, each connected part a zone, cut to the field and clear of existing zones;
 * parts under the minimum area (after cutting) are left out. Largest first.
 */
export function hotspotZones({ cells, grid, boundary, existing, bufferM, minAreaM2 }: HotspotZoneOptions): HotspotZones {
	if (!(bufferM >= 0 && bufferM <= MAX_BUFFER_M)) throw new Error(`the buffer must be 0 to ${MAX_BUFFER_M} m, got ${bufferM}`);
	if (!(minAreaM2 >= 0 && minAreaM2 <= MAX_MIN_AREA_M2)) throw new Error(`the minimum area must be 0 to ${MAX_MIN_AREA_M2} m², got ${minAreaM2}`);
	const out: HotspotZones = { zones: [], tooSmall: 0, insideExisting: 0 };
	const parts = cellsToPolygons(cells, grid, bufferM);
	const plane = planeFor(grid.proj, boundary);
	const boundaryXY = plane.toPlane(boundary);
	const existingXY = existing.map((o) => ({ name: o.name, geometry: plane.toPlane(o.geometry) }));
	for (const part of parts) {
		// The cells are in the grid's projection already: into the plane without a trip through degrees.
		const shape = plane.fromProjected({ type: 'Polygon', coordinates: part.rings });
		const clipped = clipInPlane(plane, shape, areaM2(plane.toLngLat(shape)), boundaryXY, existingXY);
		if (!clipped.ok) {
			if (clipped.error.startsWith('the shape lies wholly inside')) out.insideExisting++;
			else out.tooSmall++;
			continue;
		}
		if (clipped.areaM2 < minAreaM2) {
			out.tooSmall++;
			continue;
		}
		out.zones.push({ geometry: clipped.geometry, areaM2: clipped.areaM2, cells: part.cells, outsideM2: clipped.outsideM2, overlaps: clipped.overlaps });
	}
	out.zones.sort((a, b) => b.areaM2 - a.areaM2);
	return out;
}
