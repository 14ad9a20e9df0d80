import * as outbox from '$lib/server/mail/outbox';
import { requireOutbox } from './guard';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireOutbox(event);
	return { mails: await outbox.listForFarm(actor) };
};
