import { json } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guard';
import * as farms from '$lib/server/farms';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const user = requireUser(event, { api: true });
	return json({ user, farms: await farms.listForUser(user.id) });
};
