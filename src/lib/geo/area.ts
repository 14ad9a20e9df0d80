import type { MultiPolygon, Polygon, Position } from 'geojson';
import geodesic from 'geographiclib-geodesic';

const wgs84 = geodesic.Geodesic.WGS84;

function ringAreaM2(ring: Position[]): number {
	const polygon = wgs84.Polygon(false);
	// GeoJSON rings repeat the first position at the end; GeographicLib closes rings itself.
	const last = ring.length - 1;
	const closed = last > 0 && ring[0][0] === ring[last][0] && ring[0][1] === ring[last][1];
	for (let i = 0; i < (closed ? last : ring.length); i++) polygon.AddPoint(ring[i][1], ring[i][0]);
	return Math.abs(polygon.Compute(false, true).area ?? 0);
}

/**
 * Ellipsoidal (WGS84) area of a polygon or multipolygon, holes subtracted, in m2, by
 * GeographicLib's geodesic polygon area (Karney 2013): what people are shown, since a
 * spherical area is off by a few tenths of a percent at farm latitudes.
 * @example areaM2({ type: 'Polygon', coordinates: [[[0,0],[0.01,0],[0.01,0.01],[0,0.01],[0,0]]] }) // ≈ 1.2308e6
 */
export function areaM2(geometry: Polygon | MultiPolygon): number {
	const polygons = geometry.type === 'Polygon' ? [geometry.coordinates] : geometry.coordinates;
	let total = 0;
	for (const rings of polygons) {
		rings.forEach((ring, i) => {
			total += i === 0 ? ringAreaM2(ring) : -ringAreaM2(ring);
		});
	}
	return total;
}
