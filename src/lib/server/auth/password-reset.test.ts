// Against the real database and the fake SMTP server: the token is read from the mail, as a
// person would follow the link.
import { eq, sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { checkCredentials } from '$lib/server/accounts';
import { db } from '$lib/server/db';
import { auditLog, passwordResets } from '$lib/server/db/schema';
import { makeUser } from '$lib/server/testing/fixtures';
import { linksIn, waitForMail } from '$lib/server/testing/outbox';
import { checkResetToken, requestPasswordReset, resetPassword } from './password-reset';
import { createSession, validateSession } from './session';

async function requestAndRead(email: string) {
	const since = new Date(Date.now() - 1000);
	const asked = await requestPasswordReset(email);
	expect(asked).not.toBeNull();
	expect((await asked!.sent).ok).toBe(true);
	const mail = await waitForMail(email, { since, kind: 'password-reset' });
	const link = linksIn(mail.textBody).find((l) => l.includes('/reset-password/'));
	expect(link).toMatch(/^http:\/\/127\.0\.0\.1:4173\/reset-password\/[A-Za-z0-9_-]{43}$/);
	return { token: link!.split('/').pop()!, mail };
}

describe('password reset', () => {
	it('mails a link whose token is stored only as its SHA-256', async () => {
		const user = await makeUser();
		const { token, mail } = await requestAndRead(user.email);
		expect(mail.textBody).toContain('expires in 1 hour');
		expect(mail.textBody).toContain('If you did not ask for this, ignore this message');
		expect(mail.farmId).toBeNull();
		const rows = await db.execute<{ row: string; token_hash: string; minutes: number }>(
			sql`select p::text as row, token_hash, extract(epoch from (expires_at - created_at)) / 60 as minutes from password_resets p where user_id = ${user.id}`
		);
		expect(rows).toHaveLength(1);
		expect(rows[0].row).not.toContain(token);
		const { createHash } = await import('node:crypto');
		expect(rows[0].token_hash).toBe(createHash('sha256').update(token).digest('hex'));
		expect(Number(rows[0].minutes)).toBeCloseTo(60, 5);
		expect(await checkResetToken(token)).toMatchObject({ userId: user.id, email: user.email });
	});

	it('an unknown e-mail makes no token and sends nothing', async () => {
		const before = await db.select({ n: sql<number>`count(*)::int` }).from(passwordResets);
		expect(await requestPasswordReset(`nobody-${Date.now()}@test.example`)).toBeNull();
		const after = await db.select({ n: sql<number>`count(*)::int` }).from(passwordResets);
		expect(after[0].n).toBe(before[0].n);
	});

	it('sets the password, ends every session, audits, and works only once even when used twice at the same moment', async () => {
		const user = await makeUser();
		const phone = await createSession(user.id);
		const laptop = await createSession(user.id);
		const { token } = await requestAndRead(user.email);
		const results = await Promise.all([resetPassword(token, 'first new password'), resetPassword(token, 'second new password')]);
		expect(results.filter((r) => r === user.id)).toHaveLength(1);
		expect(results.filter((r) => r === null)).toHaveLength(1);
		// Exactly one of the two passwords took, and it is the winner's.
		const winner = results[0] ? 'first new password' : 'second new password';
		const loser = results[0] ? 'second new password' : 'first new password';
		expect(await checkCredentials(user.email, winner)).toBe(user.id);
		expect(await checkCredentials(user.email, loser)).toBeNull();
		expect(await checkCredentials(user.email, user.password)).toBeNull();
		expect((await validateSession(phone.id)).session).toBeNull();
		expect((await validateSession(laptop.id)).session).toBeNull();
		expect(await checkResetToken(token)).toBeNull();
		expect(await resetPassword(token, 'third new password')).toBeNull();
		const audits = await db.select().from(auditLog).where(eq(auditLog.actorId, user.id));
		expect(audits.filter((a) => a.action === 'account.password_reset')).toHaveLength(1);
	});

	it('refuses an expired link and leaves the password alone', async () => {
		const user = await makeUser();
		const { token } = await requestAndRead(user.email);
		await db.execute(sql`update password_resets set expires_at = now() - interval '1 second' where user_id = ${user.id}`);
		expect(await checkResetToken(token)).toBeNull();
		expect(await resetPassword(token, 'a new password here')).toBeNull();
		expect(await checkCredentials(user.email, user.password)).toBe(user.id);
	});

	it('a new request kills the older unused link', async () => {
		const user = await makeUser();
		const first = await requestAndRead(user.email);
		const second = await requestAndRead(user.email);
		expect(second.token).not.toBe(first.token);
		expect(await checkResetToken(first.token)).toBeNull();
		expect(await resetPassword(first.token, 'a new password here')).toBeNull();
		expect(await resetPassword(second.token, 'a new password here')).toBe(user.id);
	});

	it('a token of the wrong shape is refused without error', async () => {
		expect(await checkResetToken('short')).toBeNull();
		expect(await checkResetToken("'; drop table users; --aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa")).toBeNull();
		expect(await resetPassword('x'.repeat(43), 'a new password here')).toBeNull();
	});
});
