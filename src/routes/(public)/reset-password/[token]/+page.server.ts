import { fail, redirect } from '@sveltejs/kit';
import { passwordProblem } from '$lib/server/auth/password';
import { checkResetToken, resetPassword } from '$lib/server/auth/password-reset';
import { createSession, setSessionCookie } from '$lib/server/auth/session';
import type { Actions, PageServerLoad } from './$types';

// The token is in the address: keep it out of Referer headers and caches.
const privateHeaders = { 'referrer-policy': 'no-referrer', 'cache-control': 'no-store' };

export const load: PageServerLoad = async ({ params, setHeaders }) => {
	setHeaders(privateHeaders);
	const owner = await checkResetToken(params.token);
	return { valid: !!owner, email: owner?.email ?? null };
};

export const actions: Actions = {
	default: async (event) => {
		const form = await event.request.formData();
		const next = String(form.get('next') ?? '');
		const repeat = String(form.get('repeat') ?? '');
		const problem = passwordProblem(next);
		if (problem) return fail(400, { message: `New password: ${problem}` });
		if (next !== repeat) return fail(400, { message: 'The two passwords differ.' });
		const userId = await resetPassword(event.params.token, next, event.getClientAddress());
		if (!userId) return fail(400, { expired: true, message: 'This link has been used or has expired.' });
		// Every other session has ended; this device is signed in with the new password.
		setSessionCookie(event.cookies, await createSession(userId), event.url.protocol === 'https:');
		redirect(303, '/account?password=reset');
	}
};
