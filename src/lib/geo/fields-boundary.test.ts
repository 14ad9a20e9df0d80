import type { Polygon } from 'geojson';
import { expect, test } from 'vitest';
import { checkBoundary } from './fields-boundary';

const square = (lng: number, lat: number, d: number) => [[lng, lat], [lng + d, lat], [lng + d, lat + d], [lng, lat + d], [lng, lat]];

// Area of a lat/lng quadrangle on the WGS84 ellipsoid from the authalic function q (Snyder 1987,
// Map Projections: A Working Manual, eq. 3-12): A = a^2 / 2 * dLng * (q2 - q1). At these sizes a
// geodesic top edge and the parallel enclose the same area to a few cm2.
const a = 6378137;
const e = Math.sqrt((2 - 1 / 298.257223563) / 298.257223563);
const q = (latDeg: number) => {
	const s = Math.sin((latDeg * Math.PI) / 180);
	return (1 - e * e) * (s / (1 - e * e * s * s) - (1 / (2 * e)) * Math.log((1 - e * s) / (1 + e * s)));
};
const quadrangleM2 = (lat: number, d: number) => ((a * a) / 2) * ((d * Math.PI) / 180) * (q(lat + d) - q(lat));

test('a square of 0.01 degrees at the equator is kept with its ellipsoidal area (Snyder eq. 3-12)', () => {
	const result = checkBoundary({ type: 'Polygon', coordinates: [square(0, 0, 0.01)] });
	if ('error' in result) throw new Error(result.error);
	expect(Math.abs(result.areaM2 - quadrangleM2(0, 0.01))).toBeLessThan(0.01);
});

test('a Feature is unwrapped, altitudes dropped, repeats removed and an open ring closed', () => {
	const result = checkBoundary({
		type: 'Feature',
		properties: {},
		geometry: { type: 'Polygon', coordinates: [[[0, 0, 5], [0.01, 0, 5], [0.01, 0, 5], [0.01, 0.01, 5], [0, 0.01, 5]]] }
	});
	if ('error' in result) throw new Error(result.error);
	expect((result.boundary as Polygon).coordinates[0]).toEqual([[0, 0], [0.01, 0], [0.01, 0.01], [0, 0.01], [0, 0]]);
});

test('a bow tie is refused at its crossing (0.005, 0.005), found by hand', () => {
	const result = checkBoundary({ type: 'Polygon', coordinates: [[[0, 0], [0.01, 0.01], [0.01, 0], [0, 0.01], [0, 0]]] });
	expect(result).toEqual({ error: 'the boundary crosses itself near 0.005000, 0.005000' });
});

test('a hole and a second part survive; holes subtract from the area', () => {
	const result = checkBoundary({
		type: 'MultiPolygon',
		coordinates: [[square(0, 0, 0.01), square(0.004, 0.004, 0.002)], [square(0.02, 0, 0.01)]]
	});
	if ('error' in result) throw new Error(result.error);
	expect(result.boundary.type).toBe('MultiPolygon');
	const expected = 2 * quadrangleM2(0, 0.01) - quadrangleM2(0.004, 0.002);
	expect(Math.abs(result.areaM2 - expected)).toBeLessThan(0.01);
});

test('an island inside another part’s hole is allowed; a part inside a part is not', () => {
	const island = checkBoundary({
		type: 'MultiPolygon',
		coordinates: [[square(0, 0, 0.01), square(0.003, 0.003, 0.004)], [square(0.004, 0.004, 0.002)]]
	});
	expect('error' in island).toBe(false);
	const nested = checkBoundary({ type: 'MultiPolygon', coordinates: [[square(0, 0, 0.01)], [square(0.004, 0.004, 0.002)]] });
	expect(nested).toEqual({ error: 'part 2 lies inside part 1; draw it as a hole instead' });
});

test('a hole outside its ring, a two-corner ring and projected metres are refused with the place', () => {
	expect(checkBoundary({ type: 'Polygon', coordinates: [square(0, 0, 0.01), square(0.05, 0.05, 0.001)] })).toEqual({
		error: 'hole 1 lies outside its outer ring (near 0.050000, 0.050000)'
	});
	expect(checkBoundary({ type: 'Polygon', coordinates: [[[0, 0], [1, 1], [0, 0]]] })).toEqual({
		error: 'outer ring has fewer than 3 distinct corners'
	});
	expect(checkBoundary({ type: 'Polygon', coordinates: [[[400000, 5220000], [400100, 5220000], [400100, 5220100], [400000, 5220000]]] })).toEqual({
		error: 'outer ring, position 1 (400000, 5220000) is not longitude/latitude in degrees'
	});
	expect(checkBoundary({ type: 'Point', coordinates: [0, 0] })).toEqual({ error: 'the boundary must be a Polygon or MultiPolygon, got Point' });
	expect(checkBoundary(null)).toEqual({ error: 'the boundary must be a Polygon or MultiPolygon, got nothing' });
});

test('a boundary over 100 km2 is refused', () => {
	const result = checkBoundary({ type: 'Polygon', coordinates: [square(0, 0, 0.1)] });
	expect(result).toEqual({ error: 'the boundary encloses 123 km², more than the 100 km² a field may have' });
});
