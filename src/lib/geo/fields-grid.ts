import type { MultiPolygon, Polygon } from 'geojson';
import proj4 from 'proj4';
import type { GridSpec } from '../compute/types';

/**
 * The grid a field keeps after its boundary is edited: same projection, cell size and cell
 * alignment, so a cell still means the same ground. Columns and rows grow to cover the new
 * boundary and never shrink (cells outside it are clipped away anyway, and results already
 * stored for them stay addressable). Where the new boundary reaches west or south of the
 * origin, the origin moves out by whole cells and `shiftCols`/`shiftRows` say by how many, since
 * every stored (col, row) of the field would then be renumbered.
 * @example fitGrid(field.grid, editedBoundary) // { grid, shiftCols: 0, shiftRows: 0 } when it stays inside
 */
export function fitGrid(
	grid: GridSpec,
	boundary: Polygon | MultiPolygon
): { grid: GridSpec; shiftCols: number; shiftRows: number } {
	const cell = grid.cellSizeM;
	if (!(cell > 0)) throw new Error(`grid cell size must be positive, got ${cell}`);
	const forward = proj4('EPSG:4326', grid.proj).forward;
	let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
	const polygons = boundary.type === 'Polygon' ? [boundary.coordinates] : boundary.coordinates;
	for (const rings of polygons) {
		for (const [lng, lat] of rings[0] ?? []) {
			const [x, y] = forward([lng, lat]);
			minX = Math.min(minX, x); maxX = Math.max(maxX, x);
			minY = Math.min(minY, y); maxY = Math.max(maxY, y);
		}
	}
	if (!Number.isFinite(minX)) throw new Error('boundary has no positions');
	const shiftCols = minX < grid.originX ? Math.ceil((grid.originX - minX) / cell) : 0;
	const shiftRows = minY < grid.originY ? Math.ceil((grid.originY - minY) / cell) : 0;
	const originX = grid.originX - shiftCols * cell;
	const originY = grid.originY - shiftRows * cell;
	return {
		grid: {
			...grid,
			originX,
			originY,
			cols: Math.max(grid.cols + shiftCols, Math.ceil((maxX - originX) / cell)),
			rows: Math.max(grid.rows + shiftRows, Math.ceil((maxY - originY) / cell))
		},
		shiftCols,
		shiftRows
	};
}
