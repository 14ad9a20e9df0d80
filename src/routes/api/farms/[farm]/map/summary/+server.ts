import { error, json } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import * as map from '$lib/server/map/data';
import { parseMapQuery } from '$lib/server/map/dataset';
import type { RequestHandler } from './$types';

/** Cell and hotspot counts of a season, an application or two seasons compared (?season, ?application, ?compare; optional ?threshold). */
export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	const query = parseMapQuery(event.url.searchParams);
	if ('error' in query) error(400, query.error);
	return json(await map.summary(actor, query), { headers: { 'cache-control': 'private, no-store' } });
};
