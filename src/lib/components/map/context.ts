import { getContext, setContext } from 'svelte';
import type { Map as MapLibreMap } from 'maplibre-gl';

const key = Symbol('map');

/** What a layer component inside a MapView gets: the map once its style has loaded, else null. */
export type MapContext = { readonly map: MapLibreMap | null };

export function setMapContext(context: MapContext) {
	setContext(key, context);
}

export function getMapContext(): MapContext {
	const context = getContext<MapContext | undefined>(key);
	if (!context) throw new Error('map layers must be placed inside a MapView');
	return context;
}

/** [west, south, east, north] in degrees. */
export type Bounds = [number, number, number, number];

/** The bounds of any GeoJSON geometries' positions, or null when there are none. */
export function boundsOf(geometries: Iterable<{ type: string; coordinates: unknown } | null | undefined>): Bounds | null {
	let west = Infinity, south = Infinity, east = -Infinity, north = -Infinity;
	const visit = (c: unknown): void => {
		if (!Array.isArray(c)) return;
		if (typeof c[0] === 'number' && typeof c[1] === 'number') {
			west = Math.min(west, c[0]); east = Math.max(east, c[0]);
			south = Math.min(south, c[1]); north = Math.max(north, c[1]);
		} else for (const child of c) visit(child);
	};
	for (const g of geometries) if (g) visit(g.coordinates);
	return Number.isFinite(west) ? [west, south, east, north] : null;
}

/**
 * Takes a layer component's layers (top first) and then its sources off the map, skipping what is
 * already gone; when the map itself was removed first (the page was left), there is nothing to do.
 */
export function removeFromMap(map: MapLibreMap, layers: string[], sources: string[]): void {
	try {
		for (const layer of layers) if (map.getLayer(layer)) map.removeLayer(layer);
		for (const source of sources) if (map.getSource(source)) map.removeSource(source);
	} catch {
		// The map was removed first: its layers and sources went with it.
	}
}
