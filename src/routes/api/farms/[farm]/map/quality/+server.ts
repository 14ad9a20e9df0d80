import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { parseMapQuery } from '$lib/server/map/dataset';
import { qualityLayer } from '$lib/server/map/quality';
import type { RequestHandler } from './$types';

/** Flagged track of a season's or an application's applications, GeoJSON (?season or ?application; ?compare gives the later season). */
export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'map', { api: true });
	const query = parseMapQuery(event.url.searchParams);
	if ('error' in query) error(400, query.error);
	return json(await qualityLayer(actor, query.dataset), { headers: { 'content-type': 'application/geo+json', 'cache-control': 'private, no-store' } });
};
