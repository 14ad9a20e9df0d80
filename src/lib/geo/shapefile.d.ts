// shapefile 0.6.6 (a dev dependency: the independent reader the exports are checked with) ships no types.
declare module 'shapefile' {
	import type { Feature, FeatureCollection } from 'geojson';
	type Source = ArrayBuffer | Uint8Array | string;
	export function read(shp: Source, dbf?: Source, options?: { encoding?: string }): Promise<FeatureCollection>;
	export function open(
		shp: Source,
		dbf?: Source,
		options?: { encoding?: string }
	): Promise<{ bbox: number[]; read(): Promise<{ done: boolean; value: Feature }> }>;
}
