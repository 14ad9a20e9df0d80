import { sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { signInFailures } from '$lib/server/db/schema';

// Per account slows guessing one password; per address slows trying many accounts.
export const limits = {
	account: { max: 5, windowMinutes: 15 },
	address: { max: 30, windowMinutes: 15 },
	// Password reset requests (every request counts, not only failures): per e-mail so one inbox
	// is not flooded, per address so one machine cannot mail many people.
	resetEmail: { max: 3, windowMinutes: 60 },
	resetAddress: { max: 10, windowMinutes: 60 }
} as const;

type Kind = keyof typeof limits;

/** Minutes until the key may try again, or 0 when it may try now. */
export async function minutesLocked(kind: Kind, value: string): Promise<number> {
	const { max, windowMinutes } = limits[kind];
	const rows = await db
		.select({
			count: signInFailures.count,
			left: sql<number>`extract(epoch from (${signInFailures.windowStartedAt} + make_interval(mins => ${windowMinutes}) - now()))`
		})
		.from(signInFailures)
		.where(sql`${signInFailures.key} = ${`${kind}:${value}`}`);
	const row = rows[0];
	if (!row || row.count < max || row.left <= 0) return 0;
	return Math.max(1, Math.ceil(row.left / 60));
}

/** Counts one more try (a failed sign-in, a reset request) for the key. */
export async function recordFailure(kind: Kind, value: string): Promise<void> {
	const { windowMinutes } = limits[kind];
	await db.execute(sql`
		insert into sign_in_failures (key, count, window_started_at) values (${`${kind}:${value}`}, 1, now())
		on conflict (key) do update set
			count = case when sign_in_failures.window_started_at + make_interval(mins => ${windowMinutes}) < now()
				then 1 else sign_in_failures.count + 1 end,
			window_started_at = case when sign_in_failures.window_started_at + make_interval(mins => ${windowMinutes}) < now()
				then now() else sign_in_failures.window_started_at end`);
}

export async function clearFailures(kind: Kind, value: string): Promise<void> {
	await db.delete(signInFailures).where(sql`${signInFailures.key} = ${`${kind}:${value}`}`);
}
