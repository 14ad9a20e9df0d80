import { expect, test } from 'vitest';
import { areaM2 } from './area';

// Exact area on the WGS84 ellipsoid of a quadrangle bounded by two meridians and two parallels:
// A = (lng2 - lng1) * b^2 / 2 * (q(lat2) - q(lat1)), with q from the authalic latitude
// (Snyder, "Map Projections: A Working Manual", USGS Professional Paper 1395, 1987, eq. 3-12).
// A polygon's edges are geodesics, not parallels; for ~1 km edges the difference is ~1e-5.
const a = 6378137;
const f = 1 / 298.257223563;
const e2 = f * (2 - f);
const e = Math.sqrt(e2);
const q = (latDeg: number) => {
	const s = Math.sin((latDeg * Math.PI) / 180);
	return (1 - e2) * (s / (1 - e2 * s * s) - (1 / (2 * e)) * Math.log((1 - e * s) / (1 + e * s)));
};
const quadrangleM2 = (lng1: number, lat1: number, lng2: number, lat2: number) =>
	(((lng2 - lng1) * Math.PI) / 180) * (a * a) / 2 * (q(lat2) - q(lat1));

const box = (lng: number, lat: number, w: number, h: number) => [
	[lng, lat], [lng + w, lat], [lng + w, lat + h], [lng, lat + h], [lng, lat]
];

test.each([
	[-118.3, 47.1, 0.02, 0.009],
	[147.2, -35.4, 0.015, 0.012],
	[10.5, 55.2, 0.03, 0.01],
	[-97.5, 30.2, 0.01, 0.01]
])('a %f,%f quadrangle matches the ellipsoidal closed form to 0.05%% (Snyder 1987)', (lng, lat, w, h) => {
	const exact = Math.abs(quadrangleM2(lng, lat, lng + w, lat + h));
	const got = areaM2({ type: 'Polygon', coordinates: [box(lng, lat, w, h)] });
	expect(Math.abs(got - exact) / exact).toBeLessThan(5e-4);
});

test('holes are subtracted and multipolygon parts added, whatever the ring winding', () => {
	const outer = box(-118.3, 47.1, 0.02, 0.01);
	const hole = box(-118.295, 47.103, 0.005, 0.003).reverse();
	const whole = areaM2({ type: 'Polygon', coordinates: [outer] });
	const holeArea = areaM2({ type: 'Polygon', coordinates: [hole] });
	expect(areaM2({ type: 'Polygon', coordinates: [outer, hole] })).toBeCloseTo(whole - holeArea, 3);
	expect(areaM2({ type: 'MultiPolygon', coordinates: [[outer], [box(-118.25, 47.1, 0.005, 0.003)]] })).toBeCloseTo(
		whole + areaM2({ type: 'Polygon', coordinates: [box(-118.25, 47.1, 0.005, 0.003)] }),
		3
	);
});
