import { hash, verify } from '@node-rs/argon2';

// argon2id with OWASP's recommended minimum: 19 MiB memory, 2 iterations, parallelism 1.
const options = { memoryCost: 19456, timeCost: 2, outputLen: 32, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
	return hash(password, options);
}

export async function verifyPassword(stored: string, password: string): Promise<boolean> {
	try {
		return await verify(stored, password);
	} catch {
		return false; // a malformed stored hash is a failed sign-in, not a crash
	}
}

/** Returns a sentence saying what is wrong, or null when the password is acceptable. */
export function passwordProblem(password: string): string | null {
	if (password.length < 10) return 'Use at least 10 characters.';
	if (password.length > 200) return 'Use at most 200 characters.';
	return null;
}
