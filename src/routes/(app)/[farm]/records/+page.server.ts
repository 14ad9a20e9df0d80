import { may, requireRole } from '$lib/server/auth/guard';
import * as records from '$lib/server/records';
import { filterQuery, filtersFrom } from './filters';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'records.view');
	const options = await records.filterOptions(actor);
	const filters = filtersFrom(event.url.searchParams, options.seasons);
	return {
		rows: await records.list(actor, filters),
		options,
		filters,
		query: filterQuery(filters),
		units: actor.user.units,
		canSign: may(actor.role, 'records.sign')
	};
};
