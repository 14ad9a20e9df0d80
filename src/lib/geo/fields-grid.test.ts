import type { Polygon } from 'geojson';
import proj4 from 'proj4';
import { expect, test } from 'vitest';
import { describeField } from './field-geometry';
import { fitGrid } from './fields-grid';

// Boundaries are built from chosen UTM 11N coordinates with proj4's inverse, so the expected
// grid follows from the construction, not from the code under test.
const utm11 = '+proj=utm +zone=11 +datum=WGS84 +units=m +no_defs';
const inverse = proj4(utm11, 'EPSG:4326').forward;
function rectangleUtm(x0: number, y0: number, x1: number, y1: number): Polygon {
	const ring = [[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]].map((p) => inverse(p));
	return { type: 'Polygon', coordinates: [ring] };
}
// Corners 0.5 m inside whole cells, so rounding in the projection round trip cannot move a corner
// across a cell edge.
const original = rectangleUtm(400_000.5, 5_220_000.5, 400_399.5, 5_220_299.5);
const { grid } = describeField(original, 10);

test('the original grid: origin on the 10 m lattice at the south-west corner, 40 x 30 cells', () => {
	expect(grid.epsg).toBe(32611);
	expect([grid.originX, grid.originY, grid.cols, grid.rows]).toEqual([400_000, 5_220_000, 40, 30]);
});

test('refitting to the same boundary changes nothing', () => {
	expect(fitGrid(grid, original)).toEqual({ grid, shiftCols: 0, shiftRows: 0 });
});

test('a boundary reaching 55 m further east and north grows the grid, origin kept', () => {
	const { grid: fitted, shiftCols, shiftRows } = fitGrid(grid, rectangleUtm(400_000.5, 5_220_000.5, 400_454.5, 5_220_354.5));
	expect([shiftCols, shiftRows]).toEqual([0, 0]);
	expect([fitted.originX, fitted.originY, fitted.cellSizeM, fitted.proj]).toEqual([400_000, 5_220_000, 10, grid.proj]);
	expect([fitted.cols, fitted.rows]).toEqual([46, 36]);
});

test('a smaller boundary keeps every column and row, so stored cells stay addressable', () => {
	const { grid: fitted } = fitGrid(grid, rectangleUtm(400_100.5, 5_220_100.5, 400_199.5, 5_220_199.5));
	expect(fitted).toEqual(grid);
});

test('a boundary reaching 25 m west and 5 m south moves the origin by whole cells and says so', () => {
	const { grid: fitted, shiftCols, shiftRows } = fitGrid(grid, rectangleUtm(399_975.5, 5_219_995.5, 400_399.5, 5_220_299.5));
	expect([shiftCols, shiftRows]).toEqual([3, 1]);
	expect([fitted.originX, fitted.originY]).toEqual([399_970, 5_219_990]);
	// Same lattice: the old origin is still a cell corner (3 columns and 1 row in).
	expect(((grid.originX - fitted.originX) / 10) % 1).toBe(0);
	expect([fitted.cols, fitted.rows]).toEqual([43, 31]);
});

test('holes do not change the extent; parts of a multipolygon do', () => {
	const a = rectangleUtm(400_000.5, 5_220_000.5, 400_399.5, 5_220_299.5);
	const far = rectangleUtm(400_500.5, 5_220_000.5, 400_599.5, 5_220_099.5);
	const { grid: fitted } = fitGrid(grid, { type: 'MultiPolygon', coordinates: [a.coordinates, far.coordinates] });
	expect(fitted.cols).toBe(60);
});
