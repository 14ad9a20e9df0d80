import { areas, may, mayOpen, requireMember, type Area } from '$lib/server/auth/guard';
import * as farms from '$lib/server/farms';
import { devOutboxEnabled } from '$lib/server/mail/mailer';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async (event) => {
	const actor = await requireMember(event);
	await farms.rememberLastFarm(actor.user.id, actor.farm.id);
	return {
		farm: actor.farm,
		role: actor.role,
		nav: (Object.keys(areas) as Area[]).filter((area) => mayOpen(actor.role, area) && (area !== 'outbox' || devOutboxEnabled())),
		canSeePrices: may(actor.role, 'prices.view')
	};
};
