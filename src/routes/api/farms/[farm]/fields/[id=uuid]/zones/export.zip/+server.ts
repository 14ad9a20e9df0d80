import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { zonesShapefile } from '$lib/geo/zone-export';
import { attachment, fileSlug } from '$lib/server/zones/downloads';
import { exportZones } from '$lib/server/zones/export';
import type { RequestHandler } from './$types';

/** The field's zones with their target rates as a zipped ESRI shapefile (.shp, .shx, .dbf, .prj WGS84, .cpg UTF-8). */
export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'zones.view', { api: true });
	const found = await exportZones(actor, event.params.id);
	if (!found) error(404, 'No such field in this farm.');
	if (found.zones.length === 0) error(404, 'This field has no zones to export yet.');
	const base = `${fileSlug(found.fieldName)}-zones`;
	const zip = zonesShapefile(found.zones, base);
	return new Response(new Uint8Array(zip), { headers: attachment(`${base}.zip`, 'application/zip') });
};
