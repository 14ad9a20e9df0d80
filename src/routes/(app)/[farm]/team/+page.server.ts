import { fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { listMembers, changeRole, removeMember } from '$lib/server/team/members';
import { invite, listPending, resend, revoke } from '$lib/server/team/invitations';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'team');
	return { members: await listMembers(actor.farm.id), pending: await listPending(actor.farm.id), me: actor.user.id };
};

const field = (form: FormData, name: string) => String(form.get(name) ?? '');

export const actions: Actions = {
	invite: async (event) => {
		const actor = await requireRole(event, 'team.manage');
		const form = await event.request.formData();
		const r = await invite(actor, { email: form.get('email'), role: form.get('role') }, event.url.origin);
		if (!r.ok) return fail(r.status, { action: 'invite', message: r.message, email: field(form, 'email'), role: field(form, 'role') });
		return { action: 'invite', sent: { email: r.email, role: r.role, mailed: r.mailed, mailProblem: r.mailProblem, link: r.mailed ? null : r.link } };
	},
	resend: async (event) => {
		const actor = await requireRole(event, 'team.manage');
		const form = await event.request.formData();
		const r = await resend(actor, field(form, 'invitation'), event.url.origin);
		if (!r.ok) return fail(r.status, { action: 'resend', message: r.message });
		return { action: 'resend', sent: { email: r.email, role: r.role, mailed: r.mailed, mailProblem: r.mailProblem, link: r.mailed ? null : r.link } };
	},
	revoke: async (event) => {
		const actor = await requireRole(event, 'team.manage');
		const form = await event.request.formData();
		const r = await revoke(actor, field(form, 'invitation'));
		if (!r.ok) return fail(r.status, { action: 'revoke', message: r.message });
		return { action: 'revoke', done: `The invitation of ${r.email} is withdrawn; its link no longer works.` };
	},
	role: async (event) => {
		const actor = await requireRole(event, 'team.manage');
		const form = await event.request.formData();
		const r = await changeRole(actor, field(form, 'user'), form.get('role'));
		if (!r.ok) return fail(r.status, { action: 'role', message: r.message, user: field(form, 'user') });
		return { action: 'role', done: r.from === r.to ? `${r.name} already has that role.` : `${r.name} is now ${r.to === 'agronomist' || r.to === 'operator' ? 'an' : 'a'} ${r.to}.` };
	},
	remove: async (event) => {
		const actor = await requireRole(event, 'team.manage');
		const form = await event.request.formData();
		const r = await removeMember(actor, field(form, 'user'));
		if (!r.ok) return fail(r.status, { action: 'remove', message: r.message, user: field(form, 'user') });
		return {
			action: 'remove',
			done: `${r.name} is no longer a member of this farm${r.grantsRemoved ? ` and no longer sees the ${r.grantsRemoved} field${r.grantsRemoved === 1 ? '' : 's'} granted to them` : ''}. Their open sessions have ended.`
		};
	}
};
