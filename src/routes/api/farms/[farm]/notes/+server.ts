// The farm's notes as JSON for the map: ?season=2025 (or several, comma-separated) and ?field=<id>.
import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as notes from '$lib/server/notes';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'notes.view', { api: true });
	const season = event.url.searchParams.get('season');
	const seasons = season ? season.split(',').map(Number) : undefined;
	if (seasons?.some((s) => !Number.isInteger(s))) error(400, 'season must be a year, or several separated by commas, e.g. season=2025,2026');
	const fieldId = event.url.searchParams.get('field') ?? undefined;
	return json(await notes.list(actor, { seasons, fieldId }));
};
