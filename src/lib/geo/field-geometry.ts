import type { MultiPolygon, Polygon } from 'geojson';
import type { GridSpec } from '../compute/types';
import { areaM2 } from './area';
import { gridSpecFor } from './projection';

/**
 * A field's ellipsoidal area and its grid: the UTM zone of the field, square cells of
 * `cellSizeM` with the origin at a multiple of the cell size, covering the boundary.
 */
export function describeField(boundary: Polygon | MultiPolygon, cellSizeM = 10): { areaM2: number; grid: GridSpec } {
	if (!(cellSizeM >= 1 && cellSizeM <= 100)) throw new Error(`cell size must be 1 to 100 m, got ${cellSizeM}`);
	return { areaM2: areaM2(boundary), grid: gridSpecFor(boundary, { cellSizeM }) };
}

/** The columns of the fields table that describeField fills. */
export function fieldGeometryColumns(boundary: Polygon | MultiPolygon, cellSizeM = 10) {
	const { areaM2, grid } = describeField(boundary, cellSizeM);
	return {
		boundary,
		areaM2,
		gridProj: grid.proj,
		gridEpsg: grid.epsg,
		gridCellM: grid.cellSizeM,
		gridOriginX: grid.originX,
		gridOriginY: grid.originY,
		gridCols: grid.cols,
		gridRows: grid.rows
	};
}
