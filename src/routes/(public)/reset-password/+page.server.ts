import { fail } from '@sveltejs/kit';
import { minutesLocked, recordFailure } from '$lib/server/auth/rate-limit';
import { requestPasswordReset } from '$lib/server/auth/password-reset';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => ({});

export const actions: Actions = {
	default: async (event) => {
		const email = String((await event.request.formData()).get('email') ?? '').trim().toLowerCase();
		if (!email || email.length > 254 || !email.includes('@')) {
			return fail(400, { email, message: 'Enter the e-mail address you sign in with.' });
		}
		const address = event.getClientAddress();
		// Counted for every e-mail, with or without an account, so the limit tells nothing either.
		const locked = Math.max(await minutesLocked('resetEmail', email), await minutesLocked('resetAddress', address));
		if (locked > 0) {
			return fail(429, { email, message: `Too many reset requests. Try again in ${locked} minute${locked === 1 ? '' : 's'}.` });
		}
		await recordFailure('resetEmail', email);
		await recordFailure('resetAddress', address);
		// The mail is not waited for: the answer comes as fast for an unknown e-mail.
		await requestPasswordReset(email, address);
		return { sent: true, email };
	}
};
