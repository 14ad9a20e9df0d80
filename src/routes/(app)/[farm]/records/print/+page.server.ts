import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as records from '$lib/server/records';
import { filtersFrom } from '../filters';
import type { PageServerLoad } from './$types';

/** Printable records: one (?id=) or every record the list's filters select. */
export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'records.view');
	const id = event.url.searchParams.get('id');
	let keys: string[];
	let filters = null;
	if (id) keys = [id];
	else {
		const options = await records.filterOptions(actor);
		filters = filtersFrom(event.url.searchParams, options.seasons);
		keys = (await records.list(actor, filters)).map((r) => r.key);
	}
	const found = await records.getMany(actor, keys);
	if (id && found.length === 0) error(404, 'No such application record in this farm.');
	return { records: found, single: !!id, season: filters?.seasonParam ?? null, units: actor.user.units };
};
