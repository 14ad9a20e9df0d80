import { fail, redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'fields.edit');
	return { others: await fields.featureCollection(actor) };
};

export const actions: Actions = {
	default: async (event) => {
		const actor = await requireRole(event, 'fields.edit');
		const data = await event.request.formData();
		const name = String(data.get('name') ?? '');
		const cellSizeM = Number(data.get('cellSizeM') ?? 10);
		let boundary: unknown = null;
		try {
			boundary = JSON.parse(String(data.get('boundary') ?? 'null'));
		} catch {
			// Reported below as a missing boundary.
		}
		if (!boundary) return fail(400, { name, cellSizeM, message: 'Draw the boundary on the map first.' });
		const result = await fields.createMany(actor, [{ name, boundary, cellSizeM }], { via: 'draw' });
		if ('problems' in result) return fail(400, { name, cellSizeM, message: result.problems.map((p) => p.message).join(' ') });
		redirect(303, `/${actor.farm.slug}/fields/${result.ids[0]}`);
	}
};
