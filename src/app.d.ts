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
		}
	}
}

export {};
