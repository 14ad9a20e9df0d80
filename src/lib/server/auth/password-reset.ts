// Password reset by mail. The link carries 32 random bytes (base64url); the table keeps only
// their SHA-256, so a copy of the database opens no account. A link works once, for an hour; a
// new request kills the person's older links; using one ends every session of the person.
import { createHash, randomBytes } from 'node:crypto';
import { and, eq, isNull, sql } from 'drizzle-orm';
import { passwordResetMail } from '$lib/mail/password-reset';
import { db } from '$lib/server/db';
import { passwordResets, users } from '$lib/server/db/schema';
import { publicOrigin, sendMail, type Sent } from '$lib/server/mail/mailer';
import * as audit from '$lib/server/audit';
import { hashPassword } from './password';
import { invalidateUserSessions } from './session';

export const resetLifetimeMinutes = 60;

const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');
/** 32 bytes in base64url are 43 characters of A-Z a-z 0-9 - _; anything else is not ours. */
const tokenShape = /^[A-Za-z0-9_-]{43}$/;

export function newResetToken(): string {
	return randomBytes(32).toString('base64url');
}

/**
 * Makes a reset link for the account with this e-mail, if there is one, and mails it.
 * Returns null for an unknown e-mail: the caller answers the same either way. The mail is
 * handed over in `sent`, which the caller need not wait for (so the answer takes about as
 * long whether or not an account exists).
 */
export async function requestPasswordReset(email: string, address?: string): Promise<{ userId: string; sent: Promise<Sent> } | null> {
	const [user] = await db
		.select({ id: users.id, name: users.name, email: users.email })
		.from(users)
		.where(eq(users.email, email.trim().toLowerCase()));
	if (!user) return null;
	const token = newResetToken();
	await db.transaction(async (tx) => {
		await tx.delete(passwordResets).where(and(eq(passwordResets.userId, user.id), isNull(passwordResets.usedAt)));
		await tx.insert(passwordResets).values({
			userId: user.id,
			tokenHash: hashToken(token),
			expiresAt: sql`now() + make_interval(mins => ${resetLifetimeMinutes})`
		});
	});
	await audit.record({ actorId: user.id, action: 'account.password_reset_requested', detail: address ? { address } : undefined });
	const words = passwordResetMail({ name: user.name, url: `${publicOrigin()}/reset-password/${token}`, expiresInMinutes: resetLifetimeMinutes });
	const sent = sendMail({ to: user.email, kind: 'password-reset', ...words }).then((r) => {
		if (!r.ok) console.error(`[password reset] mail to user ${user.id} not sent: ${r.reason}`);
		return r;
	});
	return { userId: user.id, sent };
}

/** Whose link this is while it is unused and unexpired, else null. Reads only. */
export async function checkResetToken(token: string): Promise<{ userId: string; email: string; name: string } | null> {
	if (!tokenShape.test(token)) return null;
	const [row] = await db
		.select({ userId: users.id, email: users.email, name: users.name })
		.from(passwordResets)
		.innerJoin(users, eq(users.id, passwordResets.userId))
		.where(and(eq(passwordResets.tokenHash, hashToken(token)), isNull(passwordResets.usedAt), sql`${passwordResets.expiresAt} > now()`));
	return row ?? null;
}

/**
 * Uses the link: one statement marks it used only if it is still unused and unexpired, so of two
 * concurrent uses exactly one gets the user id. Then the new password is set in the same
 * transaction (a failure leaves the link unused), every session of the person ends, and it is
 * audited. Returns the user id, or null when the link is bad, used or expired.
 */
export async function resetPassword(token: string, newPassword: string, address?: string): Promise<string | null> {
	if (!tokenShape.test(token)) return null;
	const passwordHash = await hashPassword(newPassword); // slow: before the transaction
	const userId = await db.transaction(async (tx) => {
		const [used] = await tx
			.update(passwordResets)
			.set({ usedAt: sql`now()` })
			.where(and(eq(passwordResets.tokenHash, hashToken(token)), isNull(passwordResets.usedAt), sql`${passwordResets.expiresAt} > now()`))
			.returning({ userId: passwordResets.userId });
		if (!used) return null;
		await tx.update(users).set({ passwordHash }).where(eq(users.id, used.userId));
		return used.userId;
	});
	if (!userId) return null;
	await invalidateUserSessions(userId);
	await audit.record({ actorId: userId, action: 'account.password_reset', detail: address ? { address } : undefined });
	return userId;
}
