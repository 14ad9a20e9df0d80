import { json } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { RequestHandler } from './$types';

/** The boundaries the member may see (a landlord: granted fields only), as GeoJSON for maps. */
export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	return json(await fields.featureCollection(actor), { headers: { 'cache-control': 'private, no-store' } });
};
