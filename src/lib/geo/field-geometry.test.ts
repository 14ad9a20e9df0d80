import { expect, test } from 'vitest';
import proj4 from 'proj4';
import { describeField } from './field-geometry';
import { utmZoneForLngLat } from './projection';

test('UTM zones follow the 6-degree rule (zone 11N for -118.3, 47.1; 55S for 147.2, -35.4)', () => {
	// Zone = floor((lng + 180) / 6) + 1; EPSG 326zz north, 327zz south (EPSG registry).
	expect(utmZoneForLngLat(-118.3, 47.1).epsg).toBe(32611);
	expect(utmZoneForLngLat(147.2, -35.4).epsg).toBe(32755);
	expect(utmZoneForLngLat(180, 0).epsg).toBe(32660);
});

test('the grid origin is a multiple of the cell size and the grid covers the boundary', () => {
	const boundary = {
		type: 'Polygon' as const,
		coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]]
	};
	const { grid, areaM2 } = describeField(boundary, 10);
	expect(grid.originX % 10).toBe(0);
	expect(grid.originY % 10).toBe(0);
	const toUtm = proj4('EPSG:4326', grid.proj).forward;
	for (const [lng, lat] of boundary.coordinates[0]) {
		const [x, y] = toUtm([lng, lat]);
		expect(x).toBeGreaterThanOrEqual(grid.originX);
		expect(y).toBeGreaterThanOrEqual(grid.originY);
		expect(x).toBeLessThanOrEqual(grid.originX + grid.cols * 10);
		expect(y).toBeLessThanOrEqual(grid.originY + grid.rows * 10);
	}
	// The grid's extent is at least the field's area.
	expect(grid.cols * grid.rows * 100).toBeGreaterThan(areaM2);
	expect(() => describeField(boundary, 0)).toThrow('cell size must be 1 to 100 m');
});
