import { expect, test } from 'vitest';
import { hashPassword, passwordProblem, verifyPassword } from './password';

test('hashes with argon2id at OWASP parameters (19 MiB, 2 iterations, parallelism 1)', async () => {
	// OWASP Password Storage Cheat Sheet, argon2id minimum configuration.
	const stored = await hashPassword('a long enough password');
	expect(stored).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
	expect(await verifyPassword(stored, 'a long enough password')).toBe(true);
	expect(await verifyPassword(stored, 'a long enough passworD')).toBe(false);
});

test('a malformed stored hash fails verification instead of throwing', async () => {
	expect(await verifyPassword('not-a-hash', 'anything')).toBe(false);
});

test('password rules say what is wrong', () => {
	expect(passwordProblem('short')).toBe('Use at least 10 characters.');
	expect(passwordProblem('x'.repeat(201))).toBe('Use at most 200 characters.');
	expect(passwordProblem('ten chars!')).toBeNull();
});
