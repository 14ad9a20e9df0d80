import { error, json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { hotspotPreview, parseHotspotMode } from '$lib/server/zones/hotspots';
import { parseLength, parseSmallArea } from '$lib/server/zones/forms';
import { DEFAULT_BUFFER_M, DEFAULT_MIN_AREA_M2, MAX_BUFFER_M, MAX_MIN_AREA_M2 } from '$lib/geo/zones';
import type { RequestHandler } from './$types';

/**
 * The zones a field's hotspots would make, not saved: ?mode=season&season=2026 or
 * ?mode=persistent&earlier=2025&later=2026, &buffer= (m or ft) &minArea= (m² or ac) in the user's units, &prefix=.
 */
export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'zones.edit', { api: true });
	const q = event.url.searchParams;
	const mode = parseHotspotMode(q);
	if ('error' in mode) error(400, mode.error);
	const bufferM = parseLength(q.get('buffer'), actor.user.units, DEFAULT_BUFFER_M);
	const minAreaM2 = parseSmallArea(q.get('minArea'), actor.user.units, DEFAULT_MIN_AREA_M2);
	if (!(bufferM >= 0 && bufferM <= MAX_BUFFER_M)) error(400, `The buffer must be a number from 0 to ${MAX_BUFFER_M} m (${Math.floor(MAX_BUFFER_M / 0.3048)} ft).`);
	if (!(minAreaM2 >= 0 && minAreaM2 <= MAX_MIN_AREA_M2)) error(400, 'The minimum area must be a number from 0 to 100 ha (247 ac).');
	const preview = await hotspotPreview(actor, event.params.id, mode, { bufferM, minAreaM2, prefix: q.get('prefix') ?? undefined });
	if (!preview) error(404, 'No such field in this farm.');
	return json(preview, { headers: { 'cache-control': 'private, no-store' } });
};
