// Test-only rows added to the e2e database after the demo farm: an account the rate-limit
// test may lock without locking anyone another test signs in as, and one whose password the
// reset test changes.
import { createDb } from '../../src/lib/server/db/create';
import { users } from '../../src/lib/server/db/schema';
import { hashPassword } from '../../src/lib/server/auth/password';

const { db, client } = createDb(process.env.DATABASE_URL!, { max: 1 });
await db
	.insert(users)
	.values({ id: 'u-lockout', email: 'lockout@test.example', name: 'Lockout Test', passwordHash: await hashPassword('lockout-password') })
	.onConflictDoNothing();
// The password reset test changes this account's password; nobody else signs in as it.
await db
	.insert(users)
	.values({ id: 'u-reset', email: 'reset.tester@test.example', name: 'Reset Tester', passwordHash: await hashPassword('reset-old-password') })
	.onConflictDoNothing();
await client.end();
