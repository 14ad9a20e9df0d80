import { requireUser } from '$lib/server/auth/guard';
import * as farms from '$lib/server/farms';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async (event) => {
	const user = requireUser(event);
	return { user, farms: await farms.listForUser(user.id) };
};
