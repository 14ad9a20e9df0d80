// Team and invitations on the real database: tokens kept hashed, single use (also when two
// accepts race), expiry, revoke, resend, the last-manager rule, removal ending grants and
// sessions, and another farm's manager finding nothing here.
import { describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { auditLog, invitations, landlordGrants, memberships, sessions, users } from '$lib/server/db/schema';
import { createSession, validateSession } from '$lib/server/auth/session';
import { clearFailures, limits } from '$lib/server/auth/rate-limit';
import { makeFarm, makeField, makeUser, join, grant } from '$lib/server/testing/fixtures';
import { waitForMail, linksIn } from '$lib/server/testing/outbox';
import { changeRole, removeMember } from './members';
import { invite, listPending, resend, revoke } from './invitations';
import { acceptWithAccount, acceptWithNewAccount, acceptWithPassword, lookupInvitation } from './accept';
import { hashToken } from './tokens';
import { auditPage, auditAll } from './audit-log';

async function farmWithManager() {
	const farm = await makeFarm();
	const manager = await makeUser();
	await join(farm.id, manager.id, 'manager');
	return { farm, manager, actor: { user: manager, farm } };
}

const tokenFrom = (link: string) => link.split('/invite/')[1];
const uniqueEmail = (tag: string) => `${tag}.${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}@Invited.Example`;

async function invited(actor: Parameters<typeof invite>[0], role = 'agronomist', email = uniqueEmail('new')) {
	const since = new Date(Date.now() - 1000);
	const r = await invite(actor, { email, role });
	if (!r.ok) throw new Error(r.message);
	const mail = await waitForMail(email, { since, kind: 'invitation' });
	const link = linksIn(mail.textBody).find((l) => l.includes('/invite/'))!;
	return { ...r, mail, token: tokenFrom(link), link };
}

describe('invitations', () => {
	it('mails a 32-byte link and stores only its SHA-256', async () => {
		const { actor } = await farmWithManager();
		const inv = await invited(actor);
		expect(inv.mailed).toBe(true);
		expect(inv.email).toBe(inv.email.toLowerCase());
		expect(Buffer.from(inv.token, 'base64url')).toHaveLength(32);
		expect(inv.link).toBe(`${process.env.ORIGIN}/invite/${inv.token}`);
		expect(inv.mail.farmId).toBe(actor.farm.id);
		expect(inv.mail.textBody).toContain(actor.farm.name);
		expect(inv.mail.textBody).toContain(actor.user.name);
		expect(inv.mail.textBody).toContain('as an agronomist');
		// The raw token appears in no column of any invitation row; its hash does.
		const hits = await db.execute(sql`select count(*)::int as n from invitations i where i::text like ${'%' + inv.token + '%'}`);
		expect(hits[0].n).toBe(0);
		const [row] = await db.select().from(invitations).where(eq(invitations.id, inv.invitationId));
		expect(row.tokenHash).toBe(hashToken(inv.token));
		expect(row.expiresAt.getTime() - row.createdAt.getTime()).toBeCloseTo(7 * 24 * 3600 * 1000, -4);
		const [audited] = await db.select().from(auditLog).where(eq(auditLog.targetId, inv.invitationId));
		expect(audited).toMatchObject({ action: 'member.invited', farmId: actor.farm.id, actorId: actor.user.id });
	});

	it('refuses a bad address, an existing member and a second pending invitation', async () => {
		const { actor, manager } = await farmWithManager();
		expect(await invite(actor, { email: 'not-an-address', role: 'operator' })).toMatchObject({ ok: false, status: 400 });
		expect(await invite(actor, { email: 'a@b.example', role: 'owner' })).toMatchObject({ ok: false, status: 400 });
		const member = await invite(actor, { email: manager.email.toUpperCase(), role: 'operator' });
		expect(member).toMatchObject({ ok: false, status: 409 });
		expect(!member.ok && member.message).toContain('already a member');
		const inv = await invited(actor);
		expect(await invite(actor, { email: inv.email, role: 'operator' })).toMatchObject({ ok: false, status: 409 });
	});

	it('when the mail cannot be sent the invitation is kept and the link comes back to pass on', async () => {
		const { actor } = await farmWithManager();
		const email = uniqueEmail('offline');
		const saved = process.env.SMTP_URL;
		process.env.SMTP_URL = 'smtp://127.0.0.1:9'; // discard port: nothing listens
		let r: Awaited<ReturnType<typeof invite>>;
		try {
			r = await invite(actor, { email, role: 'operator' });
		} finally {
			process.env.SMTP_URL = saved;
		}
		expect(r).toMatchObject({ ok: true, mailed: false, mailProblem: 'The mail server did not take the message.' });
		if (!r.ok) throw new Error();
		const token = tokenFrom(r.link);
		expect(await lookupInvitation(token)).toMatchObject({ state: 'open', invitation: { email: email.toLowerCase(), role: 'operator' } });
		expect((await listPending(actor.farm.id)).map((p) => p.email)).toEqual([email.toLowerCase()]);
	});

	it('a new account joins once; the same link then says it was used', async () => {
		const { actor } = await farmWithManager();
		const inv = await invited(actor, 'operator');
		const open = await lookupInvitation(inv.token);
		expect(open).toMatchObject({ state: 'open', invitation: { email: inv.email, role: 'operator', inviterName: actor.user.name, accountExists: false } });
		expect(await acceptWithNewAccount(inv.token, { name: 'Ann', password: 'short', repeat: 'short' })).toMatchObject({ ok: false, status: 400 });
		expect(await acceptWithNewAccount(inv.token, { name: 'Ann', password: 'long enough pw', repeat: 'long enough px' })).toMatchObject({ ok: false, status: 400 });
		const done = await acceptWithNewAccount(inv.token, { name: '  Ann   Lee ', password: 'long enough pw', repeat: 'long enough pw' });
		expect(done).toMatchObject({ ok: true, farmSlug: actor.farm.slug, role: 'operator' });
		const [user] = await db.select().from(users).where(eq(users.email, inv.email));
		expect(user.name).toBe('Ann Lee');
		expect(user.passwordHash).toMatch(/^\$argon2id\$/);
		const [m] = await db.select().from(memberships).where(eq(memberships.userId, user.id));
		expect(m).toMatchObject({ farmId: actor.farm.id, role: 'operator' });
		expect(await lookupInvitation(inv.token)).toEqual({ state: 'used' });
		const again = await acceptWithNewAccount(inv.token, { name: 'Eve', password: 'long enough pw', repeat: 'long enough pw' });
		expect(again).toMatchObject({ ok: false, status: 409 });
		expect(!again.ok && again.message).toContain('already been used');
	});

	it('two accepts at the same moment: exactly one wins', async () => {
		const { actor } = await farmWithManager();
		const existing = await makeUser();
		const inv = await invited(actor, 'agronomist', existing.email);
		const results = await Promise.all([acceptWithAccount(inv.token, existing.id), acceptWithAccount(inv.token, existing.id), acceptWithAccount(inv.token, existing.id)]);
		expect(results.filter((r) => r.ok)).toHaveLength(1);
		expect(results.filter((r) => !r.ok)).toHaveLength(2);
		const rows = await db.select().from(memberships).where(eq(memberships.userId, existing.id));
		expect(rows).toHaveLength(1);
		const accepted = await db.select().from(auditLog).where(sql`${auditLog.action} = 'invitation.accepted' and ${auditLog.targetId} = ${inv.invitationId}`);
		expect(accepted).toHaveLength(1);
	});

	it('two new-account accepts racing make one account', async () => {
		const { actor } = await farmWithManager();
		const inv = await invited(actor);
		const form = { name: 'Racer', password: 'long enough pw', repeat: 'long enough pw' };
		const results = await Promise.all([acceptWithNewAccount(inv.token, form), acceptWithNewAccount(inv.token, form)]);
		expect(results.filter((r) => r.ok)).toHaveLength(1);
		expect(await db.select().from(users).where(eq(users.email, inv.email))).toHaveLength(1);
	});

	it('an expired link says so and cannot be used', async () => {
		const { actor } = await farmWithManager();
		const existing = await makeUser();
		const inv = await invited(actor, 'operator', existing.email);
		await db.update(invitations).set({ expiresAt: sql`now() - interval '1 minute'` }).where(eq(invitations.id, inv.invitationId));
		expect(await lookupInvitation(inv.token)).toEqual({ state: 'expired' });
		const r = await acceptWithAccount(inv.token, existing.id);
		expect(!r.ok && r.message).toContain('expired');
		expect(await db.select().from(memberships).where(eq(memberships.userId, existing.id))).toHaveLength(0);
		// Still listed (marked expired) so it can be sent again.
		expect((await listPending(actor.farm.id)).find((p) => p.id === inv.invitationId)?.expired).toBe(true);
	});

	it('revoke and resend kill the old link; resend mails a new one', async () => {
		const { actor } = await farmWithManager();
		const inv = await invited(actor, 'landlord');
		const since = new Date(Date.now() - 1000);
		const again = await resend(actor, inv.invitationId);
		expect(again).toMatchObject({ ok: true, mailed: true, email: inv.email, role: 'landlord' });
		expect(await lookupInvitation(inv.token)).toEqual({ state: 'revoked' });
		const mail = await waitForMail(inv.email, { since, kind: 'invitation' });
		const fresh = tokenFrom(linksIn(mail.textBody).find((l) => l.includes('/invite/'))!);
		expect(fresh).not.toBe(inv.token);
		expect((await lookupInvitation(fresh)).state).toBe('open');
		if (!again.ok) throw new Error();
		expect(await revoke(actor, again.invitationId)).toMatchObject({ ok: true });
		expect(await lookupInvitation(fresh)).toEqual({ state: 'revoked' });
		expect(await revoke(actor, again.invitationId)).toMatchObject({ ok: false, status: 404 });
		expect(await listPending(actor.farm.id)).toHaveLength(0);
		const actions = (await auditAll(actor.farm.id, { kind: 'invitations', actorId: null, page: 1 })).map((e) => e.action);
		expect(actions).toEqual(['invitation.revoked', 'invitation.resent', 'member.invited']);
	});

	it('an unknown or malformed token is "unknown", never an error', async () => {
		expect(await lookupInvitation('x')).toEqual({ state: 'unknown' });
		expect(await lookupInvitation('A'.repeat(43))).toEqual({ state: 'unknown' });
		expect(await acceptWithNewAccount("'; drop table users; --", { name: 'x', password: 'long enough pw', repeat: 'long enough pw' })).toMatchObject({ ok: false, status: 409 });
	});

	it('an existing account joins with its password, rate-limited like sign-in', async () => {
		const { actor } = await farmWithManager();
		const existing = await makeUser('the right password');
		const inv = await invited(actor, 'agronomist', existing.email);
		expect((await lookupInvitation(inv.token)).state === 'open' && (await lookupInvitation(inv.token))).toMatchObject({ invitation: { accountExists: true } });
		const address = `198.51.100.${Math.floor(Math.random() * 200)}`;
		for (let i = 0; i < limits.account.max; i++) {
			expect(await acceptWithPassword(inv.token, 'wrong password', address)).toMatchObject({ ok: false, status: 400 });
		}
		expect(await acceptWithPassword(inv.token, 'the right password', address)).toMatchObject({ ok: false, status: 429 });
		await clearFailures('account', existing.email);
		expect(await acceptWithPassword(inv.token, 'the right password', address)).toMatchObject({ ok: true, role: 'agronomist', userId: existing.id });
	});

	it('a signed-in account with another e-mail cannot use the link', async () => {
		const { actor } = await farmWithManager();
		const other = await makeUser();
		const inv = await invited(actor);
		expect(await acceptWithAccount(inv.token, other.id)).toMatchObject({ ok: false, status: 409 });
		expect((await lookupInvitation(inv.token)).state).toBe('open'); // the failed try did not use it up
	});
});

describe('members', () => {
	it('the last manager can be neither demoted nor removed', async () => {
		const { actor, manager } = await farmWithManager();
		const demote = await changeRole(actor, manager.id, 'agronomist');
		expect(demote).toMatchObject({ ok: false, status: 409 });
		expect(!demote.ok && demote.message).toContain('last manager');
		expect(await removeMember(actor, manager.id)).toMatchObject({ ok: false, status: 409 });
		const second = await makeUser();
		await join(actor.farm.id, second.id, 'manager');
		expect(await changeRole(actor, manager.id, 'agronomist')).toMatchObject({ ok: true, from: 'manager', to: 'agronomist' });
		expect(await removeMember(actor, second.id)).toMatchObject({ ok: false, status: 409 });
	});

	it('two managers demoting each other at once leave one manager', async () => {
		const { actor, manager } = await farmWithManager();
		const second = await makeUser();
		await join(actor.farm.id, second.id, 'manager');
		const other = { user: second, farm: actor.farm };
		const r = await Promise.all([changeRole(actor, second.id, 'operator'), changeRole(other, manager.id, 'operator')]);
		expect(r.filter((x) => x.ok)).toHaveLength(1);
		const managers = await db.select().from(memberships).where(sql`${memberships.farmId} = ${actor.farm.id} and ${memberships.role} = 'manager'`);
		expect(managers).toHaveLength(1);
	});

	it('changing a role is audited with from and to', async () => {
		const { actor } = await farmWithManager();
		const sam = await makeUser();
		await join(actor.farm.id, sam.id, 'operator');
		expect(await changeRole(actor, sam.id, 'landlord')).toMatchObject({ ok: true });
		expect(await changeRole(actor, sam.id, 'boss')).toMatchObject({ ok: false, status: 400 });
		const page = await auditPage(actor.farm.id, { kind: 'team', actorId: null, page: 1 });
		expect(page.entries[0]).toMatchObject({ action: 'membership.role_changed', detail: { from: 'operator', to: 'landlord' } });
		expect(page.entries[0].sentence).toBe(`${actor.user.name} changed ${sam.name}’s role from operator to landlord.`);
	});

	it('removal deletes the grants here and ends every session', async () => {
		const { actor } = await farmWithManager();
		const landlord = await makeUser();
		await join(actor.farm.id, landlord.id, 'landlord');
		const f1 = await makeField(actor.farm.id, 'North');
		const f2 = await makeField(actor.farm.id, 'South');
		await grant(actor.farm.id, landlord.id, f1.id);
		await grant(actor.farm.id, landlord.id, f2.id);
		// A grant in another farm stays.
		const { farm: elsewhere } = await farmWithManager();
		await join(elsewhere.id, landlord.id, 'landlord');
		const f3 = await makeField(elsewhere.id, 'Elsewhere');
		await grant(elsewhere.id, landlord.id, f3.id);
		const session = await createSession(landlord.id);
		expect((await validateSession(session.id)).user?.id).toBe(landlord.id);

		expect(await removeMember(actor, landlord.id)).toMatchObject({ ok: true, grantsRemoved: 2 });
		expect(await db.select().from(memberships).where(sql`${memberships.farmId} = ${actor.farm.id} and ${memberships.userId} = ${landlord.id}`)).toHaveLength(0);
		const left = await db.select().from(landlordGrants).where(eq(landlordGrants.userId, landlord.id));
		expect(left.map((g) => g.fieldId)).toEqual([f3.id]);
		expect(await db.select().from(sessions).where(eq(sessions.userId, landlord.id))).toHaveLength(0);
		expect((await validateSession(session.id)).user).toBeNull();
		const [entry] = (await auditPage(actor.farm.id, { kind: 'deletions', actorId: actor.user.id, page: 1 })).entries;
		expect(entry).toMatchObject({ action: 'membership.removed', detail: { from: 'landlord' } });
	});

	it('another farm’s manager finds neither members nor invitations here', async () => {
		const a = await farmWithManager();
		const b = await farmWithManager();
		const sam = await makeUser();
		await join(a.farm.id, sam.id, 'operator');
		const inv = await invited(a.actor);
		expect(await changeRole(b.actor, sam.id, 'manager')).toMatchObject({ ok: false, status: 404 });
		expect(await removeMember(b.actor, sam.id)).toMatchObject({ ok: false, status: 404 });
		expect(await resend(b.actor, inv.invitationId)).toMatchObject({ ok: false, status: 404 });
		expect(await revoke(b.actor, inv.invitationId)).toMatchObject({ ok: false, status: 404 });
		expect(await revoke(b.actor, 'not-a-uuid')).toMatchObject({ ok: false, status: 404 });
		const [m] = await db.select().from(memberships).where(eq(memberships.userId, sam.id));
		expect(m.role).toBe('operator');
		expect((await lookupInvitation(inv.token)).state).toBe('open');
		expect((await auditPage(b.farm.id, { kind: null, actorId: null, page: 1 })).entries.some((e) => e.action === 'member.invited' && e.detail?.email === inv.email)).toBe(false);
	});
});
