import { error, fail } from '@sveltejs/kit';
import { may, requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { fieldSeasons } from '$lib/server/zones/hotspots';
import { fieldZoneSummary, ZoneFiguresProblem } from '$lib/server/zones/summary';
import { createZones, removeZone, reshapeZone, updateZone, zoneFeatures, listZones } from '$lib/server/zones/zones';
import { parseTargetRate } from '$lib/server/zones/forms';
import * as notes from '$lib/server/notes';
import { addNote, deleteNote, editNote } from '$lib/server/note-actions';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'zones.view');
	const field = await fields.get(actor, event.params.id);
	if (!field) error(404, 'No such field in this farm.');
	const seasonParam = Number(event.url.searchParams.get('season'));
	const [zoneList, zoneMap, seasons, fieldNotes] = await Promise.all([
		listZones(actor, field.id),
		zoneFeatures(actor, field.id),
		fieldSeasons(actor, field.id),
		// Landlords may open zones but never the team's notes.
		may(actor.role, 'notes.view') ? notes.list(actor, { fieldId: field.id }) : null
	]);
	const season = seasons.includes(seasonParam) ? seasonParam : seasons[0];
	// Zone figures may need drawing from the stored fixes: the page comes first, the table follows.
	const summary = fieldZoneSummary(actor, field.id, season).then(
		(s) => ({ summary: s, problem: null as string | null }),
		(e) => {
			if (e instanceof ZoneFiguresProblem) return { summary: null, problem: e.message };
			throw e;
		}
	);
	return {
		field: { id: field.id, name: field.name, areaM2: field.areaM2, boundary: field.boundary },
		zones: zoneList.map((z) => ({
			id: z.id,
			name: z.name,
			description: z.description,
			areaM2: z.areaM2,
			source: z.source,
			season: z.season,
			targetRateLPerM2: z.targetRateLPerM2,
			updatedAt: z.updatedAt
		})),
		zoneMap,
		seasons,
		season: season ?? null,
		canEdit: may(actor.role, 'zones.edit'),
		notes: fieldNotes?.filter((n) => n.zoneId !== null) ?? null,
		canWriteNotes: may(actor.role, 'notes.write'),
		canSeeField: may(actor.role, 'zones.edit') || actor.role === 'operator',
		summary
	};
};

function text(data: FormData, key: string) {
	return String(data.get(key) ?? '');
}

export const actions: Actions = {
	noteAdd: addNote,
	noteEdit: editNote,
	noteDelete: deleteNote,
	create: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const data = await event.request.formData();
		const rate = parseTargetRate(text(data, 'targetRate'), actor.user.units);
		if ('error' in rate) return fail(400, { action: 'create', message: rate.error });
		let geometry: unknown;
		try {
			geometry = JSON.parse(text(data, 'geometry'));
		} catch {
			return fail(400, { action: 'create', message: 'The shape did not arrive; draw the zone again.' });
		}
		const result = await createZones(
			actor,
			event.params.id,
			[{ name: text(data, 'name'), description: text(data, 'description'), geometry, targetRateLPerM2: rate.value }],
			{ via: 'drawn' }
		);
		if (!result) error(404, 'No such field in this farm.');
		if ('problems' in result) return fail(400, { action: 'create', message: result.problems.map((p) => p.message).join(' ') });
		const [z] = result.zones;
		return { action: 'create', saved: true, zoneId: z.id, cut: { outsideM2: z.outsideM2, overlaps: z.overlaps } };
	},
	update: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const data = await event.request.formData();
		const rate = parseTargetRate(text(data, 'targetRate'), actor.user.units);
		if ('error' in rate) return fail(400, { action: 'update', message: rate.error });
		const result = await updateZone(actor, text(data, 'zoneId'), { name: text(data, 'name'), description: text(data, 'description'), targetRateLPerM2: rate.value });
		if (!result) error(404, 'No such zone in this farm.');
		if ('error' in result) return fail(400, { action: 'update', message: result.error });
		return { action: 'update', saved: true };
	},
	reshape: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const data = await event.request.formData();
		let geometry: unknown;
		try {
			geometry = JSON.parse(text(data, 'geometry'));
		} catch {
			return fail(400, { action: 'reshape', message: 'The shape did not arrive; edit the zone again.' });
		}
		const result = await reshapeZone(actor, text(data, 'zoneId'), geometry);
		if (!result) error(404, 'No such zone in this farm.');
		if ('error' in result) return fail(400, { action: 'reshape', message: result.error });
		return { action: 'reshape', saved: true, zoneId: result.zone.id, cut: { outsideM2: result.zone.outsideM2, overlaps: result.zone.overlaps } };
	},
	remove: async (event) => {
		const actor = await requireRole(event, 'zones.edit');
		const data = await event.request.formData();
		if (!(await removeZone(actor, text(data, 'zoneId')))) error(404, 'No such zone in this farm.');
		return { action: 'remove', saved: true, name: text(data, 'name') };
	}
};
