import { error } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import { parseMapQuery } from '$lib/server/map/dataset';
import { CELLS_MAX_ZOOM, cellsTile, parseTileParams, tileResponse } from '$lib/server/map/tiles';
import type { RequestHandler } from './$types';

/** Vector tile of the weed-pressure cells (layer "cells"); a landlord's holds granted fields only. */
export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	const tile = parseTileParams(event.params);
	if (!tile || tile.z > CELLS_MAX_ZOOM) error(400, `No tile ${event.params.z}/${event.params.x}/${event.params.y}: z must be 0 to ${CELLS_MAX_ZOOM} and x, y inside the zoom level.`);
	const query = parseMapQuery(event.url.searchParams);
	if ('error' in query) error(400, query.error);
	return tileResponse(await cellsTile(actor, query, tile.z, tile.x, tile.y), event.request);
};
