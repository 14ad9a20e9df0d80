import { may, requireRole } from '$lib/server/auth/guard';
import * as uploads from '$lib/server/uploads';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'uploads');
	return { uploads: await uploads.list(actor), canUpload: may(actor.role, 'uploads.create') };
};
