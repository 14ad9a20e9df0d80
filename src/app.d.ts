import type { Actor } from '$lib/server/auth/guard';
import type { Session, SessionUser } from '$lib/server/auth/session';

declare global {
	namespace App {
		interface Error {
			message: string;
			id?: string;
		}
		interface Locals {
			user: SessionUser | null;
			session: Session | null;
			/** Memberships already checked in this request, by farm slug. */
			actors?: Map<string, Actor>;
			/** Set by handleError when the database could not be reached: the answer becomes a 503. */
			databaseUnavailable?: boolean;
		}
	}
}

export {};
