// Cells and hotspots of a season (or of two seasons compared) as plain data for exports: one
// square per 10 m grid cell with its figures in SI units, named so the same attribute names fit a
// CSV header, GeoJSON properties and a shapefile's ten-character DBF fields.
import type { Feature, FeatureCollection, Polygon } from 'geojson';
import { toCsv } from './csv';
import type { Attribute } from './shapefile';

export type CellStatus = 'persistent' | 'new' | 'cleared';

export type ExportCell = {
	fieldName: string;
	fieldId: string;
	col: number;
	row: number;
	/** The cell's corners [lng, lat], anticlockwise from the south-west. */
	corners: [number, number][];
	areaM2: number;
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
	cover: number;
	hot: boolean;
	status?: CellStatus;
};

export const cellAttributes = (seasons: string, compared: boolean): Attribute[] => [
	{ name: 'field', description: 'Field name' },
	{ name: 'field_id', description: 'Field id in Patchbook' },
	{ name: 'col', description: 'Grid column, from the west edge of the field grid' },
	{ name: 'row', description: 'Grid row, from the south edge of the field grid' },
	{ name: 'season', description: compared ? `Seasons compared (${seasons}); figures are the later season's` : 'Season' },
	{ name: 'area_m2', description: 'Cell area inside the field', unit: 'm2' },
	{ name: 'cov_m2', description: 'Area driven over (covered) in the season, summed over passes', unit: 'm2' },
	{ name: 'spr_m2', description: 'Area sprayed in the season, summed over passes', unit: 'm2' },
	{ name: 'share_pct', description: 'Treated share: sprayed over covered', unit: '%' },
	{ name: 'vol_l', description: 'Spray volume applied', unit: 'L' },
	{ name: 'cover_fr', description: 'Largest share of the cell one application drove over', unit: '0-1' },
	{ name: 'hotspot', description: 'Hotspot at the farm threshold (1) or not (0)' },
	...(compared ? [{ name: 'status', description: 'persistent (hot in both seasons), new (hot in the later only) or cleared (hot in the earlier only)' }] : [])
];

const round = (v: number, decimals: number) => Number(v.toFixed(decimals));

function properties(c: ExportCell, seasons: string, compared: boolean) {
	return {
		field: c.fieldName,
		field_id: c.fieldId,
		col: c.col,
		row: c.row,
		season: seasons,
		area_m2: round(c.areaM2, 2),
		cov_m2: round(c.coveredM2, 2),
		spr_m2: round(c.sprayedM2, 2),
		share_pct: c.coveredM2 > 0 ? round((100 * c.sprayedM2) / c.coveredM2, 2) : 0,
		vol_l: round(c.volumeL, 3),
		cover_fr: round(c.cover, 3),
		hotspot: c.hot ? 1 : 0,
		...(compared ? { status: c.status ?? '' } : {})
	};
}

/** RFC 7946 GeoJSON: each cell a polygon with its figures. */
export function cellsGeoJson(cells: ExportCell[], seasons: string, compared: boolean): FeatureCollection<Polygon> {
	return {
		type: 'FeatureCollection',
		features: cells.map(
			(c): Feature<Polygon> => ({
				type: 'Feature',
				properties: properties(c, seasons, compared),
				geometry: { type: 'Polygon', coordinates: [[...c.corners.map(([x, y]) => [round(x, 8), round(y, 8)]), [round(c.corners[0][0], 8), round(c.corners[0][1], 8)]]] }
			})
		)
	};
}

/** One row per cell, its centre in WGS 84 degrees after the attributes. */
export function cellsCsv(cells: ExportCell[], seasons: string, compared: boolean): string {
	const names = cellAttributes(seasons, compared).map((a) => a.name);
	const header = [...names, 'centre_lng_deg', 'centre_lat_deg'];
	const rows = cells.map((c) => {
		const p = properties(c, seasons, compared) as Record<string, string | number>;
		const lng = c.corners.reduce((s, q) => s + q[0], 0) / c.corners.length;
		const lat = c.corners.reduce((s, q) => s + q[1], 0) / c.corners.length;
		return [...names.map((n) => p[n]), round(lng, 8), round(lat, 8)];
	});
	return toCsv(header, rows);
}
