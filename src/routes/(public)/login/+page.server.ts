import { fail, redirect } from '@sveltejs/kit';
import { checkCredentials } from '$lib/server/accounts';
import * as audit from '$lib/server/audit';
import { clearFailures, minutesLocked, recordFailure } from '$lib/server/auth/rate-limit';
import { createSession, setSessionCookie } from '$lib/server/auth/session';
import type { Actions, PageServerLoad } from './$types';

/** Only same-site paths, so the sign-in page cannot be used to send people elsewhere. */
function safeNext(value: string | null): string {
	return value && value.startsWith('/') && !value.startsWith('//') && !value.startsWith('/\\') ? value : '/';
}

export const load: PageServerLoad = (event) => {
	if (event.locals.user) redirect(303, safeNext(event.url.searchParams.get('next')));
	return {};
};

export const actions: Actions = {
	default: async (event) => {
		const form = await event.request.formData();
		const email = String(form.get('email') ?? '').trim().toLowerCase();
		const password = String(form.get('password') ?? '');
		if (!email || !password) return fail(400, { email, message: 'Enter your e-mail and password.' });
		if (email.length > 254 || password.length > 200) {
			return fail(400, { email: '', message: 'E-mail or password is wrong.' });
		}

		const address = event.getClientAddress();
		const locked = Math.max(await minutesLocked('account', email), await minutesLocked('address', address));
		if (locked > 0) {
			return fail(429, {
				email,
				message: `Too many failed sign-ins. Try again in ${locked} minute${locked === 1 ? '' : 's'}.`
			});
		}

		const userId = await checkCredentials(email, password);
		if (!userId) {
			await recordFailure('account', email);
			await recordFailure('address', address);
			// The same words whether or not the e-mail has an account.
			return fail(400, { email, message: 'E-mail or password is wrong.' });
		}

		await clearFailures('account', email);
		const session = await createSession(userId);
		setSessionCookie(event.cookies, session, event.url.protocol === 'https:');
		await audit.record({ actorId: userId, action: 'session.signed_in', detail: { address } });
		redirect(303, safeNext(event.url.searchParams.get('next')));
	}
};
