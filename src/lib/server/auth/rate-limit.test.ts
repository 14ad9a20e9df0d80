import { expect, test } from 'vitest';
import { clearFailures, limits, minutesLocked, recordFailure } from './rate-limit';

test('an account locks after the allowed number of failures and unlocks when cleared', async () => {
	const email = `rl-${Date.now()}@test.example`;
	for (let i = 0; i < limits.account.max - 1; i++) await recordFailure('account', email);
	expect(await minutesLocked('account', email)).toBe(0);
	await recordFailure('account', email);
	const minutes = await minutesLocked('account', email);
	expect(minutes).toBeGreaterThan(0);
	expect(minutes).toBeLessThanOrEqual(limits.account.windowMinutes);
	await clearFailures('account', email);
	expect(await minutesLocked('account', email)).toBe(0);
});

test('addresses are counted apart from accounts', async () => {
	const address = `198.51.100.${Date.now() % 250}`;
	await recordFailure('address', address);
	expect(await minutesLocked('address', address)).toBe(0);
	expect(await minutesLocked('account', address)).toBe(0);
});
