import { describe, expect, test } from 'vitest';
import { colourAt, shareStops } from './ramps';
import { shareColour, smallMultiple, spanFor, type SmallCell } from './small-multiple';

const grid = { cols: 10, rows: 6, originX: 1000, originY: 5000, cellSizeM: 10 };
const cell = (col: number, row: number, share: number, cover = 1): SmallCell => ({ col, row, coveredM2: 100 * cover, sprayedM2: share * cover, cover });

/** The rectangles of a path written by smallMultiple: [x, y, width] each (height is always 1). */
function rects(d: string) {
	return [...d.matchAll(/M(-?[\d.]+) (-?[\d.]+)h(\d+)v1h-\d+z/g)].map((m) => m.slice(1).map(Number));
}

describe('small multiple of a season', () => {
	test('neighbours of one colour in a row become one rectangle; north is up', () => {
		// Row 0 is the southern row: drawn at the bottom (y = height - 1).
		const m = smallMultiple([cell(2, 0, 10), cell(3, 0, 10), cell(4, 0, 10), cell(6, 0, 10), cell(2, 5, 50)], grid, 1, []);
		expect(m.width).toBe(10);
		expect(m.height).toBe(6);
		const light = m.fills.find((f) => f.colour === shareColour(10))!;
		expect(rects(light.d)).toEqual([[2, 5, 3], [6, 5, 1]]);
		expect(rects(m.fills.find((f) => f.colour === shareColour(50))!.d)).toEqual([[2, 0, 1]]);
	});

	test('colours are the map ramp at the share rounded to 2.5 %', () => {
		expect(shareColour(20)).toBe(shareStops[3][1]);
		expect(shareColour(0)).toBe(shareStops[0][1]);
		const [r, g, b] = colourAt(shareStops, 12.5);
		expect(shareColour(12.4)).toBe(`#${[r, g, b].map((c) => c.toString(16).padStart(2, '0')).join('')}`);
	});

	test('thinly covered cells are hatched, never coloured; cells never driven over are not drawn', () => {
		const m = smallMultiple([cell(1, 1, 80, 0.3), { col: 2, row: 1, coveredM2: 0, sprayedM2: 0, cover: 0 }], grid, 1, []);
		expect(m.fills).toEqual([]);
		expect(rects(m.hatch)).toEqual([[1, 4, 1]]);
	});

	test('blocks: a span of 2 halves the size and keys blocks by their lower-left cell', () => {
		const m = smallMultiple([cell(0, 0, 5), cell(2, 0, 5), cell(8, 4, 5)], grid, 2, []);
		expect([m.width, m.height]).toEqual([5, 3]);
		expect(rects(m.fills[0].d)).toEqual([[0, 2, 2], [4, 0, 1]]);
	});

	test('the boundary is drawn in grid units from the projected rings', () => {
		// A 100 m x 60 m rectangle on the grid's origin fills the whole 10 x 6 cell grid.
		const ring = new Float64Array([1000, 5000, 1100, 5000, 1100, 5060, 1000, 5060, 1000, 5000]);
		expect(smallMultiple([], grid, 1, [ring]).outline).toBe('M0 6L10 6L10 0L0 0L0 6Z');
		expect(smallMultiple([], grid, 2, [ring]).outline).toBe('M0 3L5 3L5 0L0 0L0 3Z');
	});

	test('span keeps the longer side to at most 120 blocks', () => {
		expect(spanFor({ cols: 100, rows: 80 })).toBe(1);
		expect(spanFor({ cols: 121, rows: 80 })).toBe(2);
		expect(spanFor({ cols: 112, rows: 400 })).toBe(4);
	});
});
