import { fail } from '@sveltejs/kit';
import { eq } from 'drizzle-orm';
import { may, requireRole } from '$lib/server/auth/guard';
import { db } from '$lib/server/db';
import { farms } from '$lib/server/db/schema';
import { setHotspotThreshold } from '$lib/server/farms';
import * as fields from '$lib/server/fields';
import * as mapData from '$lib/server/map/data';
import * as notes from '$lib/server/notes';
import { addNote, deleteNote, editNote } from '$lib/server/note-actions';
import { zoneFeatures } from '$lib/server/zones/zones';
import type { Actions, PageServerLoad } from './$types';

// The page loads what frames the map and its seasons; figures and cells come from the map's JSON
// and tile APIs in the browser, so changing the season or the threshold does not reload the page.
export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'map');
	const [fieldMap, zoneMap, [farm], meta, farmNotes] = await Promise.all([
		fields.featureCollection(actor),
		zoneFeatures(actor),
		db.select({ threshold: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, actor.farm.id)),
		mapData.meta(actor),
		// Every season's notes: a farm has tens a season, and switching seasons then needs no request.
		may(actor.role, 'notes.view') ? notes.list(actor) : []
	]);
	return {
		fieldMap,
		zoneMap,
		meta,
		thresholdPercent: farm.threshold,
		canSetThreshold: may(actor.role, 'hotspots.set'),
		notes: farmNotes,
		canWriteNotes: may(actor.role, 'notes.write')
	};
};

export const actions: Actions = {
	threshold: async (event) => {
		const actor = await requireRole(event, 'hotspots.set');
		const raw = String((await event.request.formData()).get('threshold') ?? '').trim();
		const percent = raw === '' ? NaN : Number(raw);
		const result = await setHotspotThreshold(actor, percent);
		if ('error' in result) return fail(400, { action: 'threshold', message: result.error, value: raw });
		return { action: 'threshold', saved: true, thresholdPercent: result.percent };
	},
	noteAdd: addNote,
	noteEdit: editNote,
	noteDelete: deleteNote
};
