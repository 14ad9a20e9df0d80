import { fail } from '@sveltejs/kit';
import * as accounts from '$lib/server/accounts';
import * as audit from '$lib/server/audit';
import { requireUser } from '$lib/server/auth/guard';
import { passwordProblem } from '$lib/server/auth/password';
import { createSession, invalidateUserSessions, setSessionCookie } from '$lib/server/auth/session';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	return { notifyUploads: await accounts.notifyUploads(user.id), justReset: event.url.searchParams.get('password') === 'reset' };
};

export const actions: Actions = {
	units: async (event) => {
		const user = requireUser(event);
		const units = String((await event.request.formData()).get('units') ?? '');
		if (units !== 'metric' && units !== 'us') return fail(400, { unitsMessage: 'Choose metric or US customary.' });
		await accounts.setUnits(user.id, units);
		return { unitsSaved: true };
	},
	notifications: async (event) => {
		const user = requireUser(event);
		// An unticked checkbox sends nothing: absent means off.
		const on = (await event.request.formData()).get('notifyUploads') === 'on';
		await accounts.setNotifyUploads(user.id, on);
		return { notificationsSaved: true };
	},
	password: async (event) => {
		const user = requireUser(event);
		const form = await event.request.formData();
		const current = String(form.get('current') ?? '');
		const next = String(form.get('next') ?? '');
		const repeat = String(form.get('repeat') ?? '');
		if (!(await accounts.passwordMatches(user.id, current))) {
			return fail(400, { passwordMessage: 'Your current password is not right.' });
		}
		const problem = passwordProblem(next);
		if (problem) return fail(400, { passwordMessage: `New password: ${problem}` });
		if (next !== repeat) return fail(400, { passwordMessage: 'The two new passwords differ.' });
		await accounts.setPassword(user.id, next);
		// Other devices signed in with the old password are signed out; this one stays in.
		await invalidateUserSessions(user.id);
		setSessionCookie(event.cookies, await createSession(user.id), event.url.protocol === 'https:');
		await audit.record({ actorId: user.id, action: 'account.password_changed' });
		return { passwordSaved: true };
	}
};
