import { error, fail, redirect } from '@sveltejs/kit';
import { eq } from 'drizzle-orm';
import { requireRole } from '$lib/server/auth/guard';
import { db } from '$lib/server/db';
import { farms } from '$lib/server/db/schema';
import * as fields from '$lib/server/fields';
import { parseLength, parseSmallArea } from '$lib/server/zones/forms';
import { defaultPrefix, fieldSeasons, hotspotPreview, parseHotspotMode } from '$lib/server/zones/hotspots';
import { createZones, zoneFeatures } from '$lib/server/zones/zones';
import { DEFAULT_BUFFER_M, DEFAULT_MIN_AREA_M2, MAX_BUFFER_M, MAX_MIN_AREA_M2 } from '$lib/geo/zones';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'zones.edit');
	const field = await fields.get(actor, event.params.id);
	if (!field) error(404, 'No such field in this farm.');
	const [seasons, existing, [farm]] = await Promise.all([
		fieldSeasons(actor, field.id),
		zoneFeatures(actor, field.id),
		db.select({ threshold: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, actor.farm.id))
	]);
	return {
		field: { id: field.id, name: field.name, areaM2: field.areaM2, boundary: field.boundary, cellSizeM: field.gridCellM },
		seasons,
		existing,
		thresholdPercent: farm.threshold,
		// Round numbers in the user's units: 500 m² and 5 m, or an eighth of an acre and 15 ft.
		defaults: actor.user.units === 'us' ? { buffer: '15', minArea: '0.125' } : { buffer: '5', minArea: '500' }
	};
};

export const actions: Actions = {
	save: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const data = await event.request.formData();
		const mode = parseHotspotMode(data);
		if ('error' in mode) return fail(400, { message: mode.error });
		const bufferM = parseLength(String(data.get('buffer') ?? ''), actor.user.units, DEFAULT_BUFFER_M);
		const minAreaM2 = parseSmallArea(String(data.get('minArea') ?? ''), actor.user.units, DEFAULT_MIN_AREA_M2);
		if (!(bufferM >= 0 && bufferM <= MAX_BUFFER_M)) return fail(400, { message: `The buffer must be a number from 0 to ${MAX_BUFFER_M} m.` });
		if (!(minAreaM2 >= 0 && minAreaM2 <= MAX_MIN_AREA_M2)) return fail(400, { message: 'The minimum area must be a number from 0 to 100 ha.' });
		const prefix = String(data.get('prefix') ?? '').trim() || defaultPrefix(mode);
		// The zones are made again from the data, not taken from the browser: what is saved is what the server previews.
		const preview = await hotspotPreview(actor, event.params.id, mode, { bufferM, minAreaM2, prefix });
		if (!preview) error(404, 'No such field in this farm.');
		if (preview.zones.length === 0) return fail(400, { message: 'There are no zones to save with these settings.' });
		const origin = { ...mode, mode: mode.kind, thresholdPercent: preview.thresholdPercent, bufferM, minAreaM2 };
		const season = mode.kind === 'season' ? mode.season : mode.later;
		const result = await createZones(
			actor,
			event.params.id,
			preview.zones.map((z) => ({ name: z.name, geometry: z.geometry, season })),
			{ via: 'hotspots', origin }
		);
		if (!result) error(404, 'No such field in this farm.');
		if ('problems' in result) return fail(400, { message: `Nothing was saved: ${result.problems.map((p) => p.message).join(' ')}` });
		redirect(303, `/${actor.farm.slug}/fields/${event.params.id}/zones?made=${result.zones.length}&season=${season}`);
	}
};
