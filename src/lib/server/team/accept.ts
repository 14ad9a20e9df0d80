// Invitations from the invited person's side: what a link is, and accepting it either with a new
// account or with the account that already has the invited e-mail. The token is consumed by one
// conditional UPDATE inside the same transaction as the membership, so two tabs (or two people
// with the same mail) cannot both use it, and a failure after consuming puts it back.
import { and, eq, sql } from 'drizzle-orm';
import { randomUUID } from 'node:crypto';
import { db } from '$lib/server/db';
import { auditLog, farms, invitations, memberships, users, type Role } from '$lib/server/db/schema';
import { checkCredentials } from '$lib/server/accounts';
import { hashPassword, passwordProblem } from '$lib/server/auth/password';
import { clearFailures, minutesLocked, recordFailure } from '$lib/server/auth/rate-limit';
import { hashToken, looksLikeToken } from './tokens';
import { problem, type Outcome } from './outcome';

export type DeadState = 'unknown' | 'used' | 'revoked' | 'expired';

/** One sentence per kind of dead link; none names the farm or the address. */
export const deadLinkWords: Record<DeadState, string> = {
	unknown: 'This invitation link is not valid. Check that the whole link from the mail was copied, or ask the farm’s manager for a new invitation.',
	used: 'This invitation has already been used. If that was you, sign in with your e-mail and password; otherwise ask the farm’s manager for a new invitation.',
	revoked: 'This invitation was withdrawn, or replaced by a newer one. Use the link in the newest mail, or ask the farm’s manager for a new invitation.',
	expired: 'This invitation has expired. Ask the farm’s manager to send it again.'
};

export type OpenInvitation = {
	id: string;
	email: string;
	role: Role;
	farm: { id: string; slug: string; name: string };
	inviterName: string | null;
	expiresAt: Date;
	/** Whether an account with the invited e-mail exists: then the person joins with it. */
	accountExists: boolean;
};

export type Lookup = { state: 'open'; invitation: OpenInvitation } | { state: DeadState };

export async function lookupInvitation(token: string): Promise<Lookup> {
	if (!looksLikeToken(token)) return { state: 'unknown' };
	const [row] = await db
		.select({
			id: invitations.id,
			email: invitations.email,
			role: invitations.role,
			farm: { id: farms.id, slug: farms.slug, name: farms.name },
			inviterName: users.name,
			expiresAt: invitations.expiresAt,
			usedAt: invitations.usedAt,
			revokedAt: invitations.revokedAt,
			expired: sql<boolean>`${invitations.expiresAt} <= now()`,
			accountExists: sql<boolean>`exists (select 1 from users u where u.email = ${invitations.email})`
		})
		.from(invitations)
		.innerJoin(farms, eq(farms.id, invitations.farmId))
		.leftJoin(users, eq(users.id, invitations.invitedBy))
		.where(eq(invitations.tokenHash, hashToken(token)));
	if (!row) return { state: 'unknown' };
	if (row.usedAt) return { state: 'used' };
	if (row.revokedAt) return { state: 'revoked' };
	if (row.expired) return { state: 'expired' };
	const { usedAt: _u, revokedAt: _r, expired: _e, ...open } = row;
	return { state: 'open', invitation: open };
}

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/** Marks the invitation used if, at this instant, it is still usable; else nothing. */
async function consume(tx: Tx, token: string) {
	if (!looksLikeToken(token)) return null;
	const [row] = await tx
		.update(invitations)
		.set({ usedAt: sql`now()` })
		.where(
			and(
				eq(invitations.tokenHash, hashToken(token)),
				sql`${invitations.usedAt} is null and ${invitations.revokedAt} is null and ${invitations.expiresAt} > now()`
			)
		)
		.returning({ id: invitations.id, farmId: invitations.farmId, email: invitations.email, role: invitations.role, invitedBy: invitations.invitedBy });
	return row ?? null;
}

/** Why a token could not be consumed, as a Problem. */
async function deadProblem(token: string) {
	const found = await lookupInvitation(token);
	return problem(409, found.state === 'open' ? 'The invitation changed meanwhile; open the link again.' : deadLinkWords[found.state]);
}

class Rollback extends Error {
	constructor(readonly outcome: ReturnType<typeof problem>) {
		super(outcome.message);
	}
}

export type Joined = { userId: string; farmSlug: string; role: Role; alreadyMember: boolean };

async function slugOf(farmId: string) {
	const [farm] = await db.select({ slug: farms.slug }).from(farms).where(eq(farms.id, farmId));
	return farm.slug;
}

/** A new account for the invited e-mail, its membership, the token used: all or nothing. */
export async function acceptWithNewAccount(token: string, input: { name: unknown; password: unknown; repeat: unknown }): Promise<Outcome<Joined>> {
	const name = String(input.name ?? '').trim().replace(/\s+/g, ' ');
	const password = String(input.password ?? '');
	if (!name) return problem(400, 'Enter your name: the team sees it beside your uploads, notes and records.');
	if (name.length > 100) return problem(400, 'Your name is too long (at most 100 characters).');
	const bad = passwordProblem(password);
	if (bad) return problem(400, `Password: ${bad}`);
	if (password !== String(input.repeat ?? '')) return problem(400, 'The two passwords differ. Type the same password twice.');
	const passwordHash = await hashPassword(password);

	try {
		return await db.transaction(async (tx) => {
			const inv = await consume(tx, token);
			if (!inv) throw new Rollback(await deadProblem(token));
			const [taken] = await tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email));
			if (taken) throw new Rollback(problem(409, 'An account with this e-mail address exists now. Open the link again to join with its password.'));
			const userId = `u-${randomUUID()}`;
			await tx.insert(users).values({ id: userId, email: inv.email, name, passwordHash, lastFarmId: inv.farmId });
			await tx.insert(memberships).values({ farmId: inv.farmId, userId, role: inv.role });
			await tx.insert(auditLog).values({
				farmId: inv.farmId,
				actorId: userId,
				action: 'invitation.accepted',
				targetType: 'invitation',
				targetId: inv.id,
				detail: { email: inv.email, name, role: inv.role, account: 'new', invitedBy: inv.invitedBy }
			});
			return { ok: true as const, userId, farmSlug: await slugOf(inv.farmId), role: inv.role, alreadyMember: false };
		});
	} catch (e) {
		if (e instanceof Rollback) return e.outcome;
		throw e;
	}
}

/** The signed-in (or password-checked) account joins; its e-mail must be the invited one. */
export async function acceptWithAccount(token: string, userId: string): Promise<Outcome<Joined>> {
	try {
		return await db.transaction(async (tx) => {
			const inv = await consume(tx, token);
			if (!inv) throw new Rollback(await deadProblem(token));
			const [user] = await tx.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, userId));
			if (!user || user.email !== inv.email) {
				throw new Rollback(problem(409, 'This invitation is for another e-mail address than the account you are signed in with.'));
			}
			const [existing] = await tx
				.select({ role: memberships.role })
				.from(memberships)
				.where(and(eq(memberships.farmId, inv.farmId), eq(memberships.userId, userId)));
			// Already in the farm (say, through another invitation): keep the role the farm gave them.
			if (!existing) await tx.insert(memberships).values({ farmId: inv.farmId, userId, role: inv.role });
			await tx.insert(auditLog).values({
				farmId: inv.farmId,
				actorId: userId,
				action: 'invitation.accepted',
				targetType: 'invitation',
				targetId: inv.id,
				detail: { email: inv.email, name: user.name, role: existing?.role ?? inv.role, account: 'existing', invitedBy: inv.invitedBy, ...(existing ? { alreadyMember: true } : {}) }
			});
			return { ok: true as const, userId, farmSlug: await slugOf(inv.farmId), role: existing?.role ?? inv.role, alreadyMember: !!existing };
		});
	} catch (e) {
		if (e instanceof Rollback) return e.outcome;
		throw e;
	}
}

/**
 * Someone not signed in proves they own the invited account with its password, counted against
 * the same limits as the sign-in page (per account and per address).
 */
export async function acceptWithPassword(token: string, password: unknown, address: string): Promise<Outcome<Joined>> {
	const found = await lookupInvitation(token);
	if (found.state !== 'open') return problem(409, deadLinkWords[found.state]);
	const email = found.invitation.email;
	const pass = String(password ?? '');
	if (!pass) return problem(400, 'Enter the password of your Patchbook account.');
	if (pass.length > 200) return problem(400, 'That password is wrong.');
	const locked = Math.max(await minutesLocked('account', email), await minutesLocked('address', address));
	if (locked > 0) return problem(429, `Too many wrong passwords. Try again in ${locked} minute${locked === 1 ? '' : 's'}.`);
	const userId = await checkCredentials(email, pass);
	if (!userId) {
		await recordFailure('account', email);
		await recordFailure('address', address);
		return problem(400, 'That password is wrong. Forgotten it? Ask the farm’s manager.');
	}
	await clearFailures('account', email);
	return acceptWithAccount(token, userId);
}
