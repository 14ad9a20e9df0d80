import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import { basemapTile } from '$lib/server/map/basemap';
import { parseTileParams, tileResponse } from '$lib/server/map/tiles';
import type { RequestHandler } from './$types';

/** The offline context basemap (Natural Earth land and borders), z0-10, for signed-in people. */
export const GET: RequestHandler = async (event) => {
	requireUser(event, { api: true });
	const tile = parseTileParams(event.params);
	if (!tile) error(400, `No tile ${event.params.z}/${event.params.x}/${event.params.y}.`);
	// The basemap is data shipped with the app: the browser may keep it for an hour, which also
	// answers MapLibre's repeated requests for one overzoomed tile without a round trip.
	return tileResponse(await basemapTile(tile.z, tile.x, tile.y), event.request, 'private, max-age=3600');
};
