import { describe, expect, test } from 'vitest';
import { booleanPointInPolygon } from '@turf/turf';
import type { MultiPolygon, Polygon } from 'geojson';
import { splitByField } from './split-by-field';
import { seededRandom } from './testing/synthetic';

// Invented fields: a square with a square hole, and a two-part field next to it.
const withHole: Polygon = {
	type: 'Polygon',
	coordinates: [
		[[-118.31, 47.09], [-118.3, 47.09], [-118.3, 47.1], [-118.31, 47.1], [-118.31, 47.09]],
		[[-118.307, 47.093], [-118.303, 47.093], [-118.303, 47.097], [-118.307, 47.097], [-118.307, 47.093]]
	]
};
const twoParts: MultiPolygon = {
	type: 'MultiPolygon',
	coordinates: [
		[[[-118.299, 47.09], [-118.29, 47.091], [-118.292, 47.1], [-118.299, 47.09]]],
		[[[-118.28, 47.09], [-118.27, 47.09], [-118.275, 47.1], [-118.28, 47.09]]]
	]
};

describe('splitByField', () => {
	test('hand-placed fixes: inside, in the hole, in the second part, outside', () => {
		const pts = [
			[-118.309, 47.091], // field 0
			[-118.305, 47.095], // the hole: outside
			[-118.275, 47.095], // field 1, second part
			[-118.2, 47.0] // outside
		];
		const r = splitByField(
			Float64Array.from(pts, (p) => p[0]),
			Float64Array.from(pts, (p) => p[1]),
			pts.length,
			[withHole, twoParts]
		);
		expect(Array.from(r.fieldOfFix)).toEqual([0, -1, 1, -1]);
		expect(r.outside).toBe(2);
		expect(Array.from(r.fixesByField[0])).toEqual([0]);
		expect(Array.from(r.fixesByField[1])).toEqual([2]);
	});

	test('agrees with Turf booleanPointInPolygon on 20,000 random points', () => {
		const rand = seededRandom(7);
		const n = 20_000;
		const lng = Float64Array.from({ length: n }, () => -118.315 + rand() * 0.05);
		const lat = Float64Array.from({ length: n }, () => 47.085 + rand() * 0.02);
		const r = splitByField(lng, lat, n, [withHole, twoParts]);
		let disagreements = 0;
		for (let i = 0; i < n; i++) {
			const pt = [lng[i], lat[i]];
			const expected = booleanPointInPolygon(pt, withHole) ? 0 : booleanPointInPolygon(pt, twoParts) ? 1 : -1;
			if (expected !== r.fieldOfFix[i]) disagreements++;
		}
		expect(disagreements).toBe(0);
		expect(r.outside + r.fixesByField[0].length + r.fixesByField[1].length).toBe(n);
		expect(r.fixesByField[0].length).toBeGreaterThan(1000);
	});

	test('overlapping boundaries: the first field in the list wins', () => {
		const big: Polygon = {
			type: 'Polygon',
			coordinates: [[[-118.4, 47.0], [-118.2, 47.0], [-118.2, 47.2], [-118.4, 47.2], [-118.4, 47.0]]]
		};
		const lng = Float64Array.from([-118.25, -118.309, -118.25]);
		const lat = Float64Array.from([47.15, 47.091, 47.15]);
		expect(Array.from(splitByField(lng, lat, 3, [withHole, big]).fieldOfFix)).toEqual([1, 0, 1]);
	});

	test('a boundary that is not a polygon is refused with its position', () => {
		expect(() =>
			splitByField(new Float64Array(1), new Float64Array(1), 1, [withHole, { type: 'Point' } as never])
		).toThrow(/field 2/);
	});
});
