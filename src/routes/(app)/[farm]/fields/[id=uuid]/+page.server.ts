import { error, fail, redirect } from '@sveltejs/kit';
import { may, requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { Actor } from '$lib/server/auth/guard';
import * as figures from '$lib/server/figures';
import { fieldTrend, smallMultiples } from '$lib/server/field-trend';
import * as notes from '$lib/server/notes';
import { deleteNote, editNote } from '$lib/server/note-actions';
import { zoneFeatures } from '$lib/server/zones/zones';
import type { Actions, PageServerLoad } from './$types';

async function fieldFigures(actor: Actor, fieldId: string) {
	const applications = await figures.listApplications(actor, { fieldId });
	return { seasons: figures.bySeason(applications), applications: applications.map(({ productIds: _p, ...a }) => a) };
}

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'fields');
	const field = await fields.get(actor, event.params.id);
	if (!field) error(404, 'No such field in this farm.');
	const canEdit = may(actor.role, 'fields.edit');
	const trend = await fieldTrend(actor, field);
	return {
		field,
		canEdit,
		applicationCount: canEdit ? await fields.applicationCount(actor, field.id) : 0,
		zoneMap: await zoneFeatures(actor, field.id),
		canEditZones: may(actor.role, 'zones.edit'),
		...(await fieldFigures(actor, field.id)),
		trend,
		smallMultiples: await smallMultiples(actor, field, trend.seasons.map((s) => s.season)),
		notes: may(actor.role, 'notes.view') ? await notes.list(actor, { fieldId: field.id }) : null,
		canWriteNotes: may(actor.role, 'notes.write')
	};
};

export const actions: Actions = {
	rename: async (event) => {
		const actor = await requireRole(event, 'fields.edit');
		const name = String((await event.request.formData()).get('name') ?? '');
		const result = await fields.rename(actor, event.params.id, name);
		if (!result) error(404, 'No such field in this farm.');
		if ('error' in result) return fail(400, { action: 'rename', name, message: result.error });
		return { action: 'rename', saved: true };
	},
	boundary: async (event) => {
		const actor = await requireRole(event, 'fields.edit');
		const text = String((await event.request.formData()).get('boundary') ?? '');
		let boundary: unknown;
		try {
			boundary = JSON.parse(text);
		} catch {
			return fail(400, { action: 'boundary', message: 'The boundary did not arrive as GeoJSON; draw it again.' });
		}
		const result = await fields.updateBoundary(actor, event.params.id, boundary);
		if (!result) error(404, 'No such field in this farm.');
		if ('error' in result) return fail(400, { action: 'boundary', message: result.error });
		return { action: 'boundary', saved: true };
	},
	noteEdit: editNote,
	noteDelete: deleteNote,
	remove: async (event) => {
		const actor = await requireRole(event, 'fields.edit');
		if (!(await fields.remove(actor, event.params.id))) error(404, 'No such field in this farm.');
		redirect(303, `/${actor.farm.slug}/fields`);
	}
};
