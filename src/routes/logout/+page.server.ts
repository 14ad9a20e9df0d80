import { redirect } from '@sveltejs/kit';
import { clearSessionCookie, invalidateSession } from '$lib/server/auth/session';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => redirect(303, '/');

export const actions: Actions = {
	default: async (event) => {
		if (event.locals.session) await invalidateSession(event.locals.session.id);
		clearSessionCookie(event.cookies);
		redirect(303, '/login');
	}
};
