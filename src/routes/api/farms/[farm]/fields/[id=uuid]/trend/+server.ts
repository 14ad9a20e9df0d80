// A field's year-over-year figures as JSON: what the field page's charts draw.
import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { fieldTrend } from '$lib/server/field-trend';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'fields', { api: true });
	const field = await fields.get(actor, event.params.id);
	if (!field) error(404, 'No such field in this farm.');
	return json(await fieldTrend(actor, field));
};
