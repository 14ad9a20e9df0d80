import type { MultiPolygon, Polygon } from 'geojson';
import proj4 from 'proj4';
import type { GridSpec } from '$lib/compute/types';
import { areaM2 } from './area';

/** UTM zone of a longitude and latitude, as EPSG code and proj4 definition (WGS84). */
export function utmFor(lng: number, lat: number): { epsg: number; proj: string } {
	const zone = Math.min(60, Math.max(1, Math.floor((lng + 180) / 6) + 1));
	const south = lat < 0;
	return {
		epsg: (south ? 32700 : 32600) + zone,
		proj: `+proj=utm +zone=${zone}${south ? ' +south' : ''} +datum=WGS84 +units=m +no_defs`
	};
}

function eachPosition(geometry: Polygon | MultiPolygon, fn: (lng: number, lat: number) => void) {
	const polygons = geometry.type === 'Polygon' ? [geometry.coordinates] : geometry.coordinates;
	for (const rings of polygons) for (const ring of rings) for (const [lng, lat] of ring) fn(lng, lat);
}

/**
 * A field's ellipsoidal area and its grid: the UTM zone of the boundary's centre, square cells
 * of `cellSizeM` with the origin at a multiple of the cell size, covering the boundary.
 */
export function describeField(boundary: Polygon | MultiPolygon, cellSizeM = 10): { areaM2: number; grid: GridSpec } {
	if (!(cellSizeM >= 1 && cellSizeM <= 100)) throw new Error(`cell size must be 1 to 100 m, got ${cellSizeM}`);
	let west = Infinity, south = Infinity, east = -Infinity, north = -Infinity;
	eachPosition(boundary, (lng, lat) => {
		west = Math.min(west, lng); east = Math.max(east, lng);
		south = Math.min(south, lat); north = Math.max(north, lat);
	});
	const { epsg, proj } = utmFor((west + east) / 2, (south + north) / 2);
	const forward = proj4('EPSG:4326', proj).forward;
	let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
	eachPosition(boundary, (lng, lat) => {
		const [x, y] = forward([lng, lat]);
		minX = Math.min(minX, x); maxX = Math.max(maxX, x);
		minY = Math.min(minY, y); maxY = Math.max(maxY, y);
	});
	const originX = Math.floor(minX / cellSizeM) * cellSizeM;
	const originY = Math.floor(minY / cellSizeM) * cellSizeM;
	return {
		areaM2: areaM2(boundary),
		grid: {
			proj,
			epsg,
			cellSizeM,
			originX,
			originY,
			cols: Math.max(1, Math.ceil((maxX - originX) / cellSizeM)),
			rows: Math.max(1, Math.ceil((maxY - originY) / cellSizeM))
		}
	};
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
