import { expect, test } from 'vitest';
import { makeUser } from '$lib/server/testing/fixtures';
import { checkCredentials } from './accounts';

test('credentials match by e-mail in any case and the right password only', async () => {
	const user = await makeUser('right password 1');
	expect(await checkCredentials(user.email.toUpperCase(), 'right password 1')).toBe(user.id);
	expect(await checkCredentials(user.email, 'wrong password 1')).toBeNull();
	expect(await checkCredentials('nobody@test.example', 'right password 1')).toBeNull();
});
