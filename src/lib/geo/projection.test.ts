import { describe, expect, test } from 'vitest';
import { Geodesic, PolygonArea } from 'geographiclib-geodesic';
import proj4 from 'proj4';
import type { Polygon } from 'geojson';
import {
	fieldScaleFactor,
	gridSpecFor,
	projectLngLat,
	projectRings,
	projectedAreaM2,
	utmScaleFactor,
	utmZoneFor,
	utmZoneForLngLat
} from './projection';

const geod = Geodesic.WGS84;

/** An invented, irregular field of roughly `radiusM` around a centre, built with geodesics. */
function inventedField(lng: number, lat: number, radiusM: number, hole = false): Polygon {
	const ring = (r: number, n: number) => {
		const pts: number[][] = [];
		for (let i = 0; i < n; i++) {
			const azi = (360 * i) / n;
			const d = r * (0.8 + 0.2 * Math.sin(i * 1.7) + 0.1 * Math.cos(i * 0.9));
			const p = geod.Direct(lat, lng, azi, d);
			pts.push([p.lon2!, p.lat2!]);
		}
		pts.push(pts[0]);
		return pts;
	};
	// Clockwise (azimuth increases clockwise); RFC 7946 asks for counter-clockwise outer rings.
	const outer = ring(radiusM, 40).reverse();
	const coordinates = [outer];
	if (hole) coordinates.push(ring(radiusM / 5, 12));
	return { type: 'Polygon', coordinates };
}

function geographicLibAreaM2(poly: Polygon): number {
	let total = 0;
	poly.coordinates.forEach((ring, idx) => {
		const pa = new PolygonArea.PolygonArea(geod, false);
		for (const [lng, lat] of ring.slice(0, -1)) pa.AddPoint(lat, lng);
		const a = Math.abs(pa.Compute(false, true).area!);
		total += idx === 0 ? a : -a;
	});
	return total;
}

describe('utmZoneForLngLat', () => {
	// Expected codes from the EPSG registry ("WGS 84 / UTM zone 11N" = 32611, etc.).
	test.each([
		[-118.3, 47.1, 32611],
		[151.2, -33.9, 32756],
		[5.3, 60.4, 32632], // Norway exception: 32V widened
		[-0.1, 51.5, 32630],
		[0.1, 51.5, 32631]
	])('%f, %f -> EPSG %i (EPSG registry)', (lng, lat, epsg) => {
		expect(utmZoneForLngLat(lng, lat).epsg).toBe(epsg);
	});

	test('rejects coordinates that are not degrees', () => {
		expect(() => utmZoneForLngLat(500000, 5200000)).toThrow(/not a WGS84/);
	});
});

describe('projection and scale factor', () => {
	test('bulk projection matches proj4 point by point (proj4)', () => {
		const zone = utmZoneForLngLat(-118.3, 47.1);
		const lng = Float64Array.from([-118.3, -118.29, -118.31]);
		const lat = Float64Array.from([47.1, 47.11, 47.09]);
		const { x, y } = projectLngLat(zone.proj, lng, lat);
		const c = proj4('WGS84', 'EPSG:32611' in proj4.defs ? 'EPSG:32611' : zone.proj);
		for (let i = 0; i < 3; i++) {
			const [ex, ey] = c.forward([lng[i], lat[i]]);
			expect(x[i]).toBeCloseTo(ex, 6);
			expect(y[i]).toBeCloseTo(ey, 6);
		}
		const some = projectLngLat(zone.proj, lng, lat, [1]);
		expect(Number.isNaN(some.x[0])).toBe(true);
		expect(some.x[1]).toBeCloseTo(x[1], 9);
	});

	// Scale factor against a measured one: a 1 km geodesic centred on the point (GeographicLib),
	// projected with proj4 (centred, because k itself changes along the line).
	test.each([
		[-117.0, 47.1],
		[-119.9, 47.1],
		[-114.05, 30.2],
		[9.5, 55.0],
		[151.2, -33.9]
	])('k at %f, %f agrees with GeographicLib distance / proj4 distance to 1e-6', (lng, lat) => {
		const zone = utmZoneForLngLat(lng, lat);
		const c = proj4('WGS84', zone.proj);
		for (const azi of [0, 63, 90]) {
			const p = geod.Direct(lat, lng, azi, 500);
			const q = geod.Direct(lat, lng, azi + 180, 500);
			const a = c.forward([q.lon2!, q.lat2!]);
			const b = c.forward([p.lon2!, p.lat2!]);
			const measured = Math.hypot(b[0] - a[0], b[1] - a[1]) / 1000;
			expect(Math.abs(utmScaleFactor(zone, lng, lat) - measured)).toBeLessThan(1e-6);
		}
	});

	// Fields at 30-55 deg, near the central meridian and near the zone edge, one with a hole.
	test.each([
		[-117.2, 30.5, 500, false],
		[-119.8, 40.0, 800, false],
		[-118.3, 47.1, 900, true],
		[-114.2, 47.1, 900, false],
		[12.4, 55.0, 600, true],
		[-60.5, -35.0, 700, false]
	])(
		'projected area / k^2 at %f, %f within 0.05%% of GeographicLib (Karney 2013)',
		(lng, lat, r, hole) => {
			const field = inventedField(lng, lat, r, hole);
			const zone = utmZoneFor(field);
			const k = fieldScaleFactor(field, zone);
			const areaM2 = projectedAreaM2(projectRings(zone.proj, field)) / (k * k);
			const reference = geographicLibAreaM2(field);
			expect(Math.abs(areaM2 - reference) / reference).toBeLessThan(0.0005);
			// One k per field is much tighter than that: k varies by parts per million across it.
			expect(Math.abs(areaM2 - reference) / reference).toBeLessThan(2e-5);
		}
	);
});

describe('gridSpecFor', () => {
	test('origin on a multiple of the cell size and cells covering the projected bbox', () => {
		const field = inventedField(-118.3, 47.1, 900);
		const zone = utmZoneFor(field);
		for (const cellSizeM of [10, 20, 7.5]) {
			const g = gridSpecFor(field, { cellSizeM });
			expect(g.epsg).toBe(32611);
			expect(g.proj).toBe(zone.proj);
			expect(g.originX / cellSizeM).toBe(Math.round(g.originX / cellSizeM));
			expect(g.originY / cellSizeM).toBe(Math.round(g.originY / cellSizeM));
			const [ring] = projectRings(zone.proj, field);
			for (let i = 0; i < ring.length; i += 2) {
				expect(ring[i]).toBeGreaterThanOrEqual(g.originX);
				expect(ring[i]).toBeLessThanOrEqual(g.originX + g.cols * cellSizeM);
				expect(ring[i + 1]).toBeGreaterThanOrEqual(g.originY);
				expect(ring[i + 1]).toBeLessThanOrEqual(g.originY + g.rows * cellSizeM);
			}
			// No spare column or row: the last one still reaches the boundary.
			const xs = Array.from(ring).filter((_, i) => i % 2 === 0);
			expect(Math.max(...xs)).toBeGreaterThan(g.originX + (g.cols - 1) * cellSizeM);
		}
	});

	test('rejects a bad cell size', () => {
		expect(() => gridSpecFor(inventedField(-118.3, 47.1, 300), { cellSizeM: 0 })).toThrow(/cellSizeM/);
	});
});
