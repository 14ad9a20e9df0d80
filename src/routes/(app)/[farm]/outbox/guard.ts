import { error, type RequestEvent } from '@sveltejs/kit';
import { requireMember, requireRole, type Actor } from '$lib/server/auth/guard';
import { devOutboxEnabled } from '$lib/server/mail/mailer';

/** A member first (else 404/sign-in), then: no outbox at all unless it is on (404), managers only (403). */
export async function requireOutbox(event: RequestEvent): Promise<Actor> {
	await requireMember(event);
	if (!devOutboxEnabled()) error(404, 'Not found');
	return requireRole(event, 'outbox');
}
