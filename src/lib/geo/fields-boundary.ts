import type { MultiPolygon, Polygon, Position } from 'geojson';
import { booleanPointInPolygon, kinks } from '@turf/turf';
import { areaM2 } from './area';

/** Largest field accepted: 100 km2 (10,000 ha), far above any one field; guards the grid size. */
export const MAX_FIELD_AREA_M2 = 100e6;

export type BoundaryCheck = { boundary: Polygon | MultiPolygon; areaM2: number } | { error: string };

const fmt = (p: Position) => `${p[0].toFixed(6)}, ${p[1].toFixed(6)}`;

function cleanRing(ring: unknown, where: string): Position[] | string {
	if (!Array.isArray(ring)) return `${where} is not a list of positions`;
	const out: Position[] = [];
	for (const [i, p] of ring.entries()) {
		if (!Array.isArray(p) || p.length < 2) return `${where}, position ${i + 1} is not [lng, lat]`;
		const [lng, lat] = p;
		if (typeof lng !== 'number' || typeof lat !== 'number' || !Number.isFinite(lng) || !Number.isFinite(lat)) {
			return `${where}, position ${i + 1} is not a pair of numbers`;
		}
		if (Math.abs(lng) > 180 || Math.abs(lat) > 90) {
			return `${where}, position ${i + 1} (${lng}, ${lat}) is not longitude/latitude in degrees`;
		}
		const last = out[out.length - 1];
		// Repeated positions (a double click) carry no shape.
		if (!last || last[0] !== lng || last[1] !== lat) out.push([lng, lat]);
	}
	if (out.length > 1 && (out[0][0] !== out[out.length - 1][0] || out[0][1] !== out[out.length - 1][1])) out.push(out[0]);
	if (out.length < 4) return `${where} has fewer than 3 distinct corners`;
	return out;
}

/**
 * A boundary as stored: a GeoJSON Polygon or MultiPolygon (a Feature is unwrapped) in [lng, lat]
 * degrees, altitudes dropped, repeated positions removed and open rings closed; or the reason it
 * cannot be a field (a ring that crosses itself or another ring, a hole outside its polygon, a
 * part inside another, no area, an implausible size). Parts and holes are kept as they are.
 * @example checkBoundary({ type: 'Polygon', coordinates: [[[0,0],[1,1],[1,0],[0,1],[0,0]]] }) // { error: 'the boundary crosses itself near 0.500000, 0.500000' }
 */
export function checkBoundary(input: unknown, { allowTouching = false }: { allowTouching?: boolean } = {}): BoundaryCheck {
	let geometry = input as { type?: unknown; coordinates?: unknown; geometry?: unknown } | null;
	if (geometry && geometry.type === 'Feature') geometry = geometry.geometry as typeof geometry;
	if (!geometry || (geometry.type !== 'Polygon' && geometry.type !== 'MultiPolygon')) {
		return { error: `the boundary must be a Polygon or MultiPolygon, got ${geometry?.type ?? 'nothing'}` };
	}
	if (!Array.isArray(geometry.coordinates) || geometry.coordinates.length === 0) return { error: 'the boundary has no coordinates' };
	const isMulti = geometry.type === 'MultiPolygon';
	const parts = (isMulti ? geometry.coordinates : [geometry.coordinates]) as unknown[];
	const polygons: Position[][][] = [];
	for (const [p, rings] of parts.entries()) {
		if (!Array.isArray(rings) || rings.length === 0) return { error: `part ${p + 1} has no rings` };
		const clean: Position[][] = [];
		for (const [r, ring] of rings.entries()) {
			const where = `${isMulti ? `part ${p + 1}, ` : ''}${r === 0 ? 'outer ring' : `hole ${r}`}`;
			const result = cleanRing(ring, where);
			if (typeof result === 'string') return { error: result };
			clean.push(result);
		}
		polygons.push(clean);
	}
	const boundary: Polygon | MultiPolygon = isMulti
		? { type: 'MultiPolygon', coordinates: polygons }
		: { type: 'Polygon', coordinates: polygons[0] };

	// kinks tests every segment against every other one, across rings and parts. With
	// allowTouching (zones, whose shapes come out of a polygon clipper), rings that only touch at a
	// corner are fine, as OGC allows: only points that are no corner of the shape count.
	const corners = allowTouching ? new Set(polygons.flat(2).map((p) => `${p[0]},${p[1]}`)) : null;
	const crossing = kinks(boundary).features.find((f) => !corners?.has(`${f.geometry.coordinates[0]},${f.geometry.coordinates[1]}`));
	if (crossing) return { error: `the boundary crosses itself near ${fmt(crossing.geometry.coordinates)}` };
	for (const [p, rings] of polygons.entries()) {
		const outer: Polygon = { type: 'Polygon', coordinates: [rings[0]] };
		// With its holes, so an island standing in another part's hole is allowed.
		const withHoles: Polygon = { type: 'Polygon', coordinates: rings };
		for (const [h, hole] of rings.slice(1).entries()) {
			if (!booleanPointInPolygon(hole[0], outer)) {
				return { error: `hole ${h + 1}${isMulti ? ` of part ${p + 1}` : ''} lies outside its outer ring (near ${fmt(hole[0])})` };
			}
		}
		for (const [q, other] of polygons.entries()) {
			const inside = allowTouching
				? other[0].some((corner) => booleanPointInPolygon(corner, withHoles, { ignoreBoundary: true }))
				: booleanPointInPolygon(other[0][0], withHoles);
			if (q !== p && inside) {
				return { error: `part ${q + 1} lies inside part ${p + 1}; draw it as a hole instead` };
			}
		}
	}
	const area = areaM2(boundary);
	if (!(area >= 1)) return { error: 'the boundary encloses no area' };
	if (area > MAX_FIELD_AREA_M2) {
		return { error: `the boundary encloses ${(area / 1e6).toFixed(0)} km², more than the ${MAX_FIELD_AREA_M2 / 1e6} km² a field may have` };
	}
	return { boundary, areaM2: area };
}
