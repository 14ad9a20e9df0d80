// Web Mercator tile maths (the XYZ scheme of OpenStreetMap and the Mapbox Vector Tile spec) and
// the bridge from a field's UTM cell grid to tile coordinates. Cells are squares in the grid's
// projection, so each is drawn from its four corners projected to [lng, lat] and then to the tile;
// corners are shared between neighbours, so rounding leaves no gaps.
import proj4 from 'proj4';
import type { GridSpec } from '../compute/types';

/** Tile coordinates per side, as MapLibre and the MVT spec default to. */
export const TILE_EXTENT = 4096;
/** [west, south, east, north], degrees. */
export type Bbox = [number, number, number, number];
export type Ring = [number, number][];
/** Inclusive column and row range of a field grid. */
export type CellRange = { col0: number; col1: number; row0: number; row1: number };

/** Web Mercator's latitude limit: the square world of the tile pyramid. */
export const MAX_LAT = 85.0511287798066;

/** Whether z/x/y names a tile of the pyramid. */
export function isTile(z: number, x: number, y: number): boolean {
	if (!Number.isInteger(z) || !Number.isInteger(x) || !Number.isInteger(y) || z < 0 || z > 30) return false;
	const n = 2 ** z;
	return x >= 0 && x < n && y >= 0 && y < n;
}

/** The tile's bounds in degrees. */
export function tileBbox(z: number, x: number, y: number): Bbox {
	const n = 2 ** z;
	const lat = (t: number) => (Math.atan(Math.sinh(Math.PI * (1 - (2 * t) / n))) * 180) / Math.PI;
	return [(x / n) * 360 - 180, lat(y + 1), ((x + 1) / n) * 360 - 180, lat(y)];
}

/** Position of [lng, lat] in the world at zoom z, in tiles (x east, y south), fractional. */
export function lngLatToWorld(z: number, lng: number, lat: number): [number, number] {
	const n = 2 ** z;
	const clamped = Math.max(-MAX_LAT, Math.min(MAX_LAT, lat));
	const phi = (clamped * Math.PI) / 180;
	return [((lng + 180) / 360) * n, ((1 - Math.log(Math.tan(phi) + 1 / Math.cos(phi)) / Math.PI) / 2) * n];
}

/** Position of [lng, lat] inside tile z/x/y in tile coordinates (0..extent across the tile; may fall outside). */
export function lngLatToTilePixel(z: number, x: number, y: number, lng: number, lat: number, extent = TILE_EXTENT): [number, number] {
	const [wx, wy] = lngLatToWorld(z, lng, lat);
	return [(wx - x) * extent, (wy - y) * extent];
}

/** Every tile at zoom z that touches the bbox, row by row. */
export function tilesForBbox(bbox: Bbox, z: number): [number, number, number][] {
	const n = 2 ** z;
	const [x0f, y1f] = lngLatToWorld(z, bbox[0], bbox[1]);
	const [x1f, y0f] = lngLatToWorld(z, bbox[2], bbox[3]);
	const clamp = (v: number) => Math.max(0, Math.min(n - 1, Math.floor(v)));
	const out: [number, number, number][] = [];
	for (let ty = clamp(y0f); ty <= clamp(y1f); ty++) for (let tx = clamp(x0f); tx <= clamp(x1f); tx++) out.push([z, tx, ty]);
	return out;
}

export function bboxesIntersect(a: Bbox, b: Bbox): boolean {
	return a[0] <= b[2] && b[0] <= a[2] && a[1] <= b[3] && b[1] <= a[3];
}

const converters = new Map<string, proj4.Converter>();
function converter(proj: string): proj4.Converter {
	let c = converters.get(proj);
	if (!c) {
		c = proj4('EPSG:4326', proj);
		converters.set(proj, c);
	}
	return c;
}

// Sampling each edge keeps the curved image of a straight edge inside the bounds: over a tile or a
// field, UTM and lng/lat lines bend by far less than a cell between eight samples.
const EDGE_SAMPLES = 8;
function edgePoints([w, s, e, n]: Bbox): [number, number][] {
	const out: [number, number][] = [];
	for (let i = 0; i < EDGE_SAMPLES; i++) {
		const t = i / EDGE_SAMPLES;
		out.push([w + (e - w) * t, s], [e, s + (n - s) * t], [e - (e - w) * t, n], [w, n - (n - s) * t]);
	}
	return out;
}

/** The [lng, lat] bounds of a field's whole grid: the ground its cells can cover. */
export function gridBbox(grid: GridSpec): Bbox {
	const c = converter(grid.proj);
	const x0 = grid.originX;
	const y0 = grid.originY;
	const x1 = x0 + grid.cols * grid.cellSizeM;
	const y1 = y0 + grid.rows * grid.cellSizeM;
	let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
	for (const [x, y] of edgePoints([x0, y0, x1, y1])) {
		const [lng, lat] = c.inverse([x, y]);
		w = Math.min(w, lng); e = Math.max(e, lng);
		s = Math.min(s, lat); n = Math.max(n, lat);
	}
	return [w, s, e, n];
}

/**
 * The grid's columns and rows that touch the bbox, clamped to the grid, or null when none do.
 * One cell of margin on each side absorbs the bend of the bbox's edges in the grid's projection.
 */
export function cellRangeInBbox(grid: GridSpec, bbox: Bbox): CellRange | null {
	const c = converter(grid.proj);
	let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
	for (const p of edgePoints(bbox)) {
		const [x, y] = c.forward([p[0], Math.max(-MAX_LAT, Math.min(MAX_LAT, p[1]))]);
		minX = Math.min(minX, x); maxX = Math.max(maxX, x);
		minY = Math.min(minY, y); maxY = Math.max(maxY, y);
	}
	const cell = grid.cellSizeM;
	const col0 = Math.max(0, Math.floor((minX - grid.originX) / cell) - 1);
	const col1 = Math.min(grid.cols - 1, Math.floor((maxX - grid.originX) / cell) + 1);
	const row0 = Math.max(0, Math.floor((minY - grid.originY) / cell) - 1);
	const row1 = Math.min(grid.rows - 1, Math.floor((maxY - grid.originY) / cell) + 1);
	if (!(col0 <= col1 && row0 <= row1)) return null;
	return { col0, col1, row0, row1 };
}

/** The four corners of cell (col, row) (or of a span x span block from it) in [lng, lat], from the south-west, anticlockwise. */
export function cellCornersLngLat(grid: GridSpec, col: number, row: number, span = 1): [number, number][] {
	const c = converter(grid.proj);
	const x0 = grid.originX + col * grid.cellSizeM;
	const y0 = grid.originY + row * grid.cellSizeM;
	const d = span * grid.cellSizeM;
	return [
		[x0, y0],
		[x0 + d, y0],
		[x0 + d, y0 + d],
		[x0, y0 + d]
	].map(([x, y]) => c.inverse([x, y]) as [number, number]);
}

/**
 * The corners of a grid's cells in Web Mercator at z0 (0..1 across the world), projected once
 * each and remembered: the pre-rendered pyramid draws the same corners at eight zooms.
 */
export function gridWorldCorners(grid: GridSpec): (i: number, j: number) => [number, number] {
	const c = converter(grid.proj);
	const corners = new Map<number, [number, number]>();
	const stride = grid.rows + 64;
	return (i, j) => {
		const key = i * stride + j;
		let p = corners.get(key);
		if (!p) {
			const [lng, lat] = c.inverse([grid.originX + i * grid.cellSizeM, grid.originY + j * grid.cellSizeM]);
			p = lngLatToWorld(0, lng, lat);
			corners.set(key, p);
		}
		return p;
	};
}

/**
 * Draws cells of one grid into one tile: `(col, row, span)` gives the closed ring of the cell (or
 * of the span x span block starting there) in integer tile coordinates, wound clockwise on screen
 * as MVT 2.1 (section 4.3.4.4) wants for exterior rings, or null when it lies wholly outside the
 * tile plus `buffer`. Corners are projected once and shared by the cells that meet there; pass
 * `corners` to share them between tiles too.
 */
export function cellRingDrawer(
	grid: GridSpec,
	z: number,
	x: number,
	y: number,
	{ extent = TILE_EXTENT, buffer = 64, corners = gridWorldCorners(grid) } = {}
) {
	const n = 2 ** z;
	const corner = (i: number, j: number): [number, number] => {
		const [mx, my] = corners(i, j);
		return [Math.round((mx * n - x) * extent), Math.round((my * n - y) * extent)];
	};
	return (col: number, row: number, span = 1): Ring | null => {
		const sw = corner(col, row);
		const nw = corner(col, row + span);
		const ne = corner(col + span, row + span);
		const se = corner(col + span, row);
		const lo = -buffer;
		const hi = extent + buffer;
		if (Math.max(sw[0], nw[0], ne[0], se[0]) < lo || Math.min(sw[0], nw[0], ne[0], se[0]) > hi) return null;
		if (Math.max(sw[1], nw[1], ne[1], se[1]) < lo || Math.min(sw[1], nw[1], ne[1], se[1]) > hi) return null;
		return [sw, nw, ne, se, sw];
	};
}
