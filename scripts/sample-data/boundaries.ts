// Field boundary files of the demo farms: GeoJSON (RFC 7946), a zipped polygon shapefile and KML.
import { toKML } from '@placemarkio/tokml';
import type { Position } from 'geojson';
import { boundaryCollection, BRENNAN_FIELDS, TALLOWGRASS_FIELDS } from './layout';
import { dbf, polygonShp, WGS84_PRJ, zipFixed } from './shapefile';

/** One feature per line: readable in a diff, and small. */
function geojsonText(fc: ReturnType<typeof boundaryCollection>): string {
	return `{"type":"FeatureCollection","features":[\n${fc.features.map((f) => JSON.stringify(f)).join(',\n')}\n]}\n`;
}

function ringArea2(ring: Position[]): number {
	let s = 0;
	for (let i = 0; i + 1 < ring.length; i++) s += ring[i][0] * ring[i + 1][1] - ring[i + 1][0] * ring[i][1];
	return s;
}

/** Shapefile rings run the other way round from RFC 7946: outer clockwise, holes counter-clockwise. */
function shapefileRings(polygons: Position[][][]): [number, number][][] {
	return polygons.flatMap((rings) =>
		rings.map((ring, k) => {
			const wantClockwise = k === 0;
			const isClockwise = ringArea2(ring) < 0;
			return (isClockwise === wantClockwise ? ring : [...ring].reverse()) as [number, number][];
		})
	);
}

export function boundaryFiles(): Record<string, Uint8Array | string> {
	const tallow = boundaryCollection(TALLOWGRASS_FIELDS);
	const records = tallow.features.map((f) => shapefileRings(f.geometry.type === 'Polygon' ? [f.geometry.coordinates] : f.geometry.coordinates));
	const { shp, shx } = polygonShp(records);
	const table = dbf([{ name: 'name', type: 'C', length: 40 }], tallow.features.map((f) => [f.properties.name]));
	return {
		'demo/boundaries/tallowgrass.geojson': geojsonText(tallow),
		'demo/boundaries/tallowgrass-boundaries.zip': zipFixed({
			'tallowgrass-boundaries.shp': shp,
			'tallowgrass-boundaries.shx': shx,
			'tallowgrass-boundaries.dbf': table,
			'tallowgrass-boundaries.prj': WGS84_PRJ,
			'tallowgrass-boundaries.cpg': 'UTF-8'
		}),
		'demo/boundaries/tallowgrass.kml': toKML(tallow),
		'demo/boundaries/brennan-creek.geojson': geojsonText(boundaryCollection(BRENNAN_FIELDS))
	};
}
