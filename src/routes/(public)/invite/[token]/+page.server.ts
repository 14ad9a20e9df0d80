import { fail, redirect } from '@sveltejs/kit';
import * as audit from '$lib/server/audit';
import { clearSessionCookie, createSession, invalidateSession, setSessionCookie } from '$lib/server/auth/session';
import { acceptWithAccount, acceptWithNewAccount, acceptWithPassword, deadLinkWords, lookupInvitation, type Joined } from '$lib/server/team/accept';
import { landingPath } from '$lib/team/roles';
import type { Actions, PageServerLoad, RequestEvent } from './$types';

export const load: PageServerLoad = async (event) => {
	const found = await lookupInvitation(event.params.token);
	if (found.state !== 'open') return { state: found.state, sentence: deadLinkWords[found.state] } as const;
	const inv = found.invitation;
	const me = event.locals.user;
	return {
		state: 'open',
		invitation: { email: inv.email, role: inv.role, farmName: inv.farm.name, inviterName: inv.inviterName, expiresAt: inv.expiresAt, accountExists: inv.accountExists },
		signedInAs: me ? { email: me.email, name: me.name, isInvited: me.email === inv.email } : null
	} as const;
};

/** Signs the person in when they are not already, then opens the farm. */
async function land(event: RequestEvent, joined: Joined, signIn: boolean): Promise<never> {
	if (signIn) {
		const session = await createSession(joined.userId);
		setSessionCookie(event.cookies, session, event.url.protocol === 'https:');
		await audit.record({ actorId: joined.userId, action: 'session.signed_in', detail: { address: event.getClientAddress(), via: 'invitation' } });
	}
	redirect(303, landingPath(joined.farmSlug, joined.role));
}

export const actions: Actions = {
	create: async (event) => {
		const form = await event.request.formData();
		const r = await acceptWithNewAccount(event.params.token, { name: form.get('name'), password: form.get('password'), repeat: form.get('repeat') });
		if (!r.ok) return fail(r.status, { message: r.message, name: String(form.get('name') ?? '') });
		// A new account replaces whoever was signed in on this browser.
		if (event.locals.session) await invalidateSession(event.locals.session.id);
		return land(event, r, true);
	},
	join: async (event) => {
		const me = event.locals.user;
		if (!me) return fail(401, { message: 'Sign in first, or enter your password below.' });
		const r = await acceptWithAccount(event.params.token, me.id);
		if (!r.ok) return fail(r.status, { message: r.message });
		return land(event, r, false);
	},
	password: async (event) => {
		const form = await event.request.formData();
		const r = await acceptWithPassword(event.params.token, form.get('password'), event.getClientAddress());
		if (!r.ok) return fail(r.status, { message: r.message });
		if (event.locals.session) await invalidateSession(event.locals.session.id);
		return land(event, r, true);
	},
	signout: async (event) => {
		if (event.locals.session) await invalidateSession(event.locals.session.id);
		clearSessionCookie(event.cookies);
		redirect(303, event.url.pathname);
	}
};
