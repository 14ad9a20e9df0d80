import { json } from '@sveltejs/kit';
import { requireMember } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireMember(event, { api: true });
	return json({ fields: await fields.list(actor) });
};
