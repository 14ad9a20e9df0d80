import { requireRole } from '$lib/server/auth/guard';
import { auditPage, auditPeople, readAuditFilter } from '$lib/server/team/audit-log';
import { auditKinds } from '$lib/team/audit-words';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'team');
	const filter = readAuditFilter(event.url.searchParams);
	const people = await auditPeople(actor.farm.id);
	// A person who never acted here names nothing: drop the filter rather than show an empty log.
	if (filter.actorId && !people.some((p) => p.id === filter.actorId)) filter.actorId = null;
	const found = await auditPage(actor.farm.id, filter);
	return {
		filter,
		people,
		kinds: Object.entries(auditKinds).map(([value, k]) => ({ value, label: k.label })),
		...found
	};
};
