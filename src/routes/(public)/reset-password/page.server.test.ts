// The request form's answer must not tell whether an account exists, and it is rate-limited.
import { isActionFailure, type RequestEvent } from '@sveltejs/kit';
import { sql } from 'drizzle-orm';
import { expect, test } from 'vitest';
import { db } from '$lib/server/db';
import { makeUser } from '$lib/server/testing/fixtures';
import { waitForMail } from '$lib/server/testing/outbox';
import { actions } from './+page.server';

function post(email: string, address = '192.0.2.7') {
	const body = new FormData();
	body.set('email', email);
	return {
		request: new Request('http://127.0.0.1/reset-password', { method: 'POST', body }),
		getClientAddress: () => address,
		url: new URL('http://127.0.0.1/reset-password'),
		params: {},
		locals: { user: null, session: null }
	} as unknown as RequestEvent;
}
const ask = (email: string, address?: string) => (actions.default as (e: RequestEvent) => Promise<unknown>)(post(email, address));

test('the same answer whether or not an account exists; the mail goes only to a real account', async () => {
	await db.execute(sql`delete from sign_in_failures where key like 'reset%'`);
	const user = await makeUser();
	const since = new Date(Date.now() - 1000);
	const known = await ask(user.email.toUpperCase(), '192.0.2.10');
	const unknown = await ask(`nobody-${Date.now()}@test.example`, '192.0.2.11');
	expect(known).toEqual({ sent: true, email: user.email });
	expect(unknown).toEqual({ sent: true, email: expect.stringMatching(/^nobody-/) });
	expect((await waitForMail(user.email, { since, kind: 'password-reset' })).subject).toBe('Reset your Patchbook password');
});

test('three requests an hour per e-mail, ten per address; then a sentence, with or without an account', async () => {
	await db.execute(sql`delete from sign_in_failures where key like 'reset%'`);
	const email = `nobody-${Date.now()}@test.example`;
	for (let i = 0; i < 3; i++) expect(await ask(email, `198.51.100.${i}`)).toEqual({ sent: true, email });
	const refused = await ask(email, '198.51.100.99');
	expect(isActionFailure(refused) && refused.status).toBe(429);
	expect(isActionFailure(refused) && refused.data).toEqual({ email, message: 'Too many reset requests. Try again in 60 minutes.' });

	for (let i = 0; i < 10; i++) expect(await ask(`other-${i}-${Date.now()}@test.example`, '203.0.113.5')).toMatchObject({ sent: true });
	const fromAddress = await ask(`yet-another-${Date.now()}@test.example`, '203.0.113.5');
	expect(isActionFailure(fromAddress) && fromAddress.status).toBe(429);
});

test('an address that is not an e-mail gets a sentence', async () => {
	const r = await ask('not an address');
	expect(isActionFailure(r) && r.data).toEqual({ email: 'not an address', message: 'Enter the e-mail address you sign in with.' });
});
