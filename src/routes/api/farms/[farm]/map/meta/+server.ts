import { json } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import * as map from '$lib/server/map/data';
import type { RequestHandler } from './$types';

/** Seasons, applications, threshold and bounds of the map, scoped to the fields the member may see. */
export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	return json(await map.meta(actor), { headers: { 'cache-control': 'private, no-store' } });
};
