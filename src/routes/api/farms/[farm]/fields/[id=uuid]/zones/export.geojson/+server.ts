import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { zonesGeojson } from '$lib/geo/zone-export';
import { attachment, fileSlug } from '$lib/server/zones/downloads';
import { exportZones } from '$lib/server/zones/export';
import type { RequestHandler } from './$types';

/** The field's zones with their target rates as GeoJSON (RFC 7946, WGS84). */
export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'zones.view', { api: true });
	const found = await exportZones(actor, event.params.id);
	if (!found) error(404, 'No such field in this farm.');
	const body = JSON.stringify(zonesGeojson(found.zones));
	return new Response(body, { headers: attachment(`${fileSlug(found.fieldName)}-zones.geojson`, 'application/geo+json') });
};
