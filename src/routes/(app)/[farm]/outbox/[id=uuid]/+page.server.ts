import { error } from '@sveltejs/kit';
import * as outbox from '$lib/server/mail/outbox';
import { requireOutbox } from '../guard';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireOutbox(event);
	const mail = await outbox.getForFarm(actor, event.params.id);
	// Another farm's message looks the same as none.
	if (!mail) error(404, 'No such message in this farm\'s outbox.');
	return { mail };
};
