import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as farms from '$lib/server/farms';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'team', { api: true });
	return json({ members: await farms.members(actor.farm.id) });
};
