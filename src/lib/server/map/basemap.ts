// The plain offline context basemap: Natural Earth 1:50m land and country borders (public
// domain, through world-atlas 2.0.2) as vector tiles, z0-10. The geojson-vt indexes are built on
// the first request, not at start-up, and kept; encoded tiles go through the same kind of LRU as
// the cell tiles.
import { createRequire } from 'node:module';
import { GeoJSONVT } from '@maplibre/geojson-vt';
import { feature, mesh } from 'topojson-client';
import type { Feature, FeatureCollection, Geometry, Position } from 'geojson';
import type { Topology } from 'topojson-specification';
import { LruCache } from './cache';
import { encodeTile, etagFor, type EncodedTile, type TileFeature } from './tiles';

export const BASEMAP_MAX_ZOOM = 10;
export const BASEMAP_ATTRIBUTION = 'Natural Earth';
// Bump when the layers or their source change, so browsers drop cached tiles.
const BASEMAP_VERSION = 'ne50m-1';

const require = createRequire(import.meta.url);

// topojson stitches rings across the antimeridian (a 180 → -180 jump draws a band across the
// world and breaks land triangulation, mapstack.md pitfall 6): unwrap each line so longitudes run
// on continuously; geojson-vt wraps what passes ±180.
function unwrap(line: Position[]): Position[] {
	let offset = 0;
	return line.map((p, i) => {
		if (i > 0) {
			const d = p[0] + offset - (line[i - 1][0] + offset);
			if (d > 180) offset -= 360;
			else if (d < -180) offset += 360;
		}
		return [p[0] + offset, p[1]];
	});
}

function unwrapGeometry(g: Geometry): Geometry {
	if (g.type === 'Polygon') return { ...g, coordinates: g.coordinates.map(unwrap) };
	if (g.type === 'MultiPolygon') return { ...g, coordinates: g.coordinates.map((p) => p.map(unwrap)) };
	if (g.type === 'LineString') return { ...g, coordinates: unwrap(g.coordinates) };
	if (g.type === 'MultiLineString') return { ...g, coordinates: g.coordinates.map(unwrap) };
	return g;
}

type Layers = { land: GeoJSONVT; borders: GeoJSONVT };
let layers: Layers | null = null;

function build(): Layers {
	const land = require('world-atlas/land-50m.json') as Topology;
	const countries = require('world-atlas/countries-50m.json') as Topology;
	const landFc = feature(land, land.objects.land) as FeatureCollection | Feature;
	const landFeatures = ('features' in landFc ? landFc.features : [landFc]).map((f) => ({ ...f, properties: {}, geometry: unwrapGeometry(f.geometry) }));
	const borders = mesh(countries, countries.objects.countries as never, (a, b) => a !== b);
	const options = { maxZoom: BASEMAP_MAX_ZOOM, indexMaxZoom: 4, tolerance: 3, buffer: 64 };
	return {
		land: new GeoJSONVT({ type: 'FeatureCollection', features: landFeatures } as FeatureCollection, options),
		borders: new GeoJSONVT({ type: 'Feature', properties: {}, geometry: unwrapGeometry(borders) } as Feature, options)
	};
}

const cache = new LruCache<EncodedTile>(2000, 32 * 1024 * 1024, (t) => (t.body?.length ?? 0) + 200);

/** The basemap tile z/x/y: gzipped MVT with layers "land" and "borders", or a null body when empty or beyond z10. */
export async function basemapTile(z: number, x: number, y: number): Promise<EncodedTile> {
	const key = `${BASEMAP_VERSION}|${z}|${x}|${y}`;
	const hit = cache.get(key);
	if (hit) return hit;
	let body: Buffer | null = null;
	if (z <= BASEMAP_MAX_ZOOM) {
		layers ??= build();
		const features = (name: keyof Layers) => (layers![name].getTile(z, x, y)?.features ?? []) as TileFeature[];
		body = await encodeTile({ land: features('land'), borders: features('borders') });
	}
	const tile = { body, etag: etagFor(key) };
	cache.set(key, tile);
	return tile;
}
