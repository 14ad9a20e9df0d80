import { expect, test } from 'vitest';
import { makeUser } from '$lib/server/testing/fixtures';
import { createSession, invalidateSession, invalidateUserSessions, validateSession } from './session';

test('a session validates until it is invalidated', async () => {
	const user = await makeUser();
	const session = await createSession(user.id);
	const days = (session.expiresAt.getTime() - Date.now()) / 86_400_000;
	expect(days).toBeGreaterThan(29);
	const valid = await validateSession(session.id);
	expect(valid.user?.email).toBe(user.email);
	await invalidateSession(session.id);
	expect((await validateSession(session.id)).user).toBeNull();
});

test('ending all of a user’s sessions signs out every device', async () => {
	const user = await makeUser();
	const a = await createSession(user.id);
	const b = await createSession(user.id);
	await invalidateUserSessions(user.id);
	expect((await validateSession(a.id)).session).toBeNull();
	expect((await validateSession(b.id)).session).toBeNull();
});

test('an unknown token is no session', async () => {
	expect(await validateSession('no-such-token')).toEqual({ session: null, user: null, renewed: false });
});
