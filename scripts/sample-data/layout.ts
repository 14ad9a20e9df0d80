// The invented farms' fields in local metres (east, north; see frame.ts). Fields are separated by
// 12 m road allowances (or the draw, a rail line, a fence strip), so no two boundaries touch.
import { roundDeg, toLngLat, type Xy } from './frame';
import { blob, ccw, cw, sample } from './plane';
import type { Feature, FeatureCollection, MultiPolygon, Polygon } from 'geojson';

/** One part: the outer ring (counter-clockwise) then holes (clockwise); rings open. */
export type LocalPart = Xy[][];

export type DemoField = {
	farm: 'tallowgrass' | 'brennan-creek';
	name: string;
	targetHa: number;
	parts: LocalPart[];
	/** Direction of travel of the passes (tillage and harvest direction), degrees from north. */
	passAngleDeg: number;
};

const rect = (x0: number, y0: number, x1: number, y1: number): Xy[] => [
	[x0, y0],
	[x1, y0],
	[x1, y1],
	[x0, y1]
];

/** The draw between Coyote Draw and Little Draw: the east edge of Coyote Draw, x as a function of y. */
export function drawX(y: number): number {
	const s = (y - 1612) / 1600;
	return 2530 + 80 * Math.sin(2 * Math.PI * 0.75 * s) + 25 * Math.sin(2 * Math.PI * 2.1 * s + 0.7);
}
const DRAW_WIDTH_M = 40;
const LITTLE_DRAW_TOP = 2112;

function tallowgrass(): DemoField[] {
	const f = (name: string, targetHa: number, passAngleDeg: number, parts: LocalPart[]): DemoField => ({
		farm: 'tallowgrass',
		name,
		targetHa,
		passAngleDeg,
		parts: parts.map(([outer, ...holes]) => [ccw(outer), ...holes.map(cw)])
	});
	// Coyote Draw: its east edge follows the draw, sampled every 40 m.
	const drawEdge = sample(1612, 3212, 40, (y): Xy => [drawX(y), y]);
	const coyote: Xy[] = [[1662, 1612], ...drawEdge, [1662, 3212]];
	const littleEdge = sample(LITTLE_DRAW_TOP, 1612, 40, (y): Xy => [drawX(y) + DRAW_WIDTH_M, y]);
	const little: Xy[] = [...littleEdge, [3262, 1612], [3262, LITTLE_DRAW_TOP]];
	return [
		f('North Flat', 180, 0, [[[[0, 1612], [1125, 1612], [1125, 3212], [60, 3212], [0, 3150]]]]),
		// The old schoolhouse lot is cut out of the south-east corner.
		f('Schoolhouse', 95, 0, [[[[1062, 0], [1590, 0], [1590, 70], [1650, 70], [1650, 1600], [1062, 1600]]]]),
		f('Coyote Draw', 140, 0, [[coyote]]),
		f('Wetland Quarter', 160, 90, [[rect(0, 0, 1050, 1600), blob(600, 720, 190, 135, 0.06, 48, 0.4)]]),
		f('Home Place', 60, 0, [[rect(1137, 1612, 1650, 2842), rect(1380, 1700, 1560, 1867)]]),
		f('Split Forty', 70, 90, [[rect(3274, 1142, 4040, 1600)], [rect(3274, 1612, 4040, 2070)]]),
		f('Long Hill', 255, 90, [[[[1722, 0], [3262, 0], [3262, 1600], [1662, 1600], [1662, 60]]]]),
		// The rail line runs along the north-east side.
		f('Railside', 75, 90, [[[[3274, 2082], [4334, 2082], [4334, 2700], [3274, 2900]]]]),
		f('East Bench', 120, 90, [[rect(3274, 0, 4334, 1130)]]),
		f('Little Draw', 32, 90, [[little]])
	];
}

/** Brennan Creek Farm lies about 9 km south-east of Tallowgrass. */
const BRENNAN_E = 7200;
const BRENNAN_N = -5400;

function brennanCreek(): DemoField[] {
	const off = (p: Xy): Xy => [p[0] + BRENNAN_E, p[1] + BRENNAN_N];
	// Creek Bottom: its west edge follows the creek.
	const creek = sample(750, 0, 30, (y): Xy => [40 * Math.sin((2 * Math.PI * y) / 900) + 20, y]);
	const bottom: Xy[] = [...creek, [620, 0] as Xy, [620, 750] as Xy].map(off);
	const bench: Xy[] = rect(700, -120, 1400, 880).map(off);
	return [
		{ farm: 'brennan-creek', name: 'Creek Bottom', targetHa: 45, passAngleDeg: 0, parts: [[ccw(bottom)]] },
		{ farm: 'brennan-creek', name: 'Upper Bench', targetHa: 70, passAngleDeg: 90, parts: [[ccw(bench)]] }
	];
}

export const TALLOWGRASS_FIELDS = tallowgrass();
export const BRENNAN_FIELDS = brennanCreek();
export const ALL_FIELDS = [...TALLOWGRASS_FIELDS, ...BRENNAN_FIELDS];

export function fieldNamed(name: string): DemoField {
	const f = ALL_FIELDS.find((x) => x.name === name);
	if (!f) throw new Error(`no demo field named "${name}"`);
	return f;
}

function ringToLngLat(ring: Xy[]): [number, number][] {
	const out = ring.map(([e, n]) => toLngLat(e, n).map(roundDeg) as [number, number]);
	return [...out, out[0]];
}

/** RFC 7946 geometry: outer rings counter-clockwise, holes clockwise, as laid out. */
export function fieldGeometry(field: DemoField): Polygon | MultiPolygon {
	const polys = field.parts.map((part) => part.map(ringToLngLat));
	return polys.length === 1 ? { type: 'Polygon', coordinates: polys[0] } : { type: 'MultiPolygon', coordinates: polys };
}

export function boundaryCollection(fields: DemoField[]): FeatureCollection<Polygon | MultiPolygon, { name: string }> {
	return {
		type: 'FeatureCollection',
		features: fields.map(
			(field): Feature<Polygon | MultiPolygon, { name: string }> => ({
				type: 'Feature',
				properties: { name: field.name },
				geometry: fieldGeometry(field)
			})
		)
	};
}
