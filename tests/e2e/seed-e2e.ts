// Test-only rows added to the e2e database after the demo farm: an account the rate-limit
// test may lock without locking anyone another test signs in as.
import { createDb } from '../../src/lib/server/db/create';
import { users } from '../../src/lib/server/db/schema';
import { hashPassword } from '../../src/lib/server/auth/password';

const { db, client } = createDb(process.env.DATABASE_URL!, { max: 1 });
await db
	.insert(users)
	.values({ id: 'u-lockout', email: 'lockout@test.example', name: 'Lockout Test', passwordHash: await hashPassword('lockout-password') })
	.onConflictDoNothing();
await client.end();
