// Every use of lucia sits in this file, so that moving to plain session tokens (the approach
// lucia's own documentation now teaches) changes this file only.
import type { Cookies } from '@sveltejs/kit';
import { DrizzlePostgreSQLAdapter } from '@lucia-auth/adapter-drizzle';
import { Lucia } from 'lucia';
import { db } from '$lib/server/db';
import { sessions, users } from '$lib/server/db/schema';

const lucia = new Lucia(new DrizzlePostgreSQLAdapter(db, sessions, users), {
	sessionExpiresIn: undefined, // lucia's default: 30 days, extended when half used
	getUserAttributes: (row) => ({ email: row.email, name: row.name, units: row.units })
});

declare module 'lucia' {
	interface Register {
		Lucia: typeof lucia;
		DatabaseUserAttributes: { email: string; name: string; units: 'metric' | 'us' };
	}
}

export type SessionUser = { id: string; email: string; name: string; units: 'metric' | 'us' };
export type Session = { id: string; userId: string; expiresAt: Date };

export const sessionCookieName = lucia.sessionCookieName;

export async function createSession(userId: string): Promise<Session> {
	const session = await lucia.createSession(userId, {});
	return { id: session.id, userId: session.userId, expiresAt: session.expiresAt };
}

/** The session and its user, or nulls; `renewed` says the cookie must be sent again. */
export async function validateSession(
	token: string
): Promise<{ session: Session | null; user: SessionUser | null; renewed: boolean }> {
	const { session, user } = await lucia.validateSession(token);
	if (!session || !user) return { session: null, user: null, renewed: false };
	return {
		session: { id: session.id, userId: session.userId, expiresAt: session.expiresAt },
		user: { id: user.id, email: user.email, name: user.name, units: user.units },
		renewed: session.fresh
	};
}

export async function invalidateSession(sessionId: string): Promise<void> {
	await lucia.invalidateSession(sessionId);
}

/** Ends every session of a user (password change, removal from the last farm). */
export async function invalidateUserSessions(userId: string): Promise<void> {
	await lucia.invalidateUserSessions(userId);
}

export function setSessionCookie(cookies: Cookies, session: Session, isHttps: boolean): void {
	cookies.set(sessionCookieName, session.id, {
		path: '/',
		httpOnly: true,
		sameSite: 'lax',
		secure: isHttps,
		expires: session.expiresAt
	});
}

export function clearSessionCookie(cookies: Cookies): void {
	cookies.delete(sessionCookieName, { path: '/' });
}
