import { drizzle } from 'drizzle-orm/postgres-js';
import postgres from 'postgres';
import * as schema from './schema';

export function createDb(url: string, options: { max?: number } = {}) {
	// While the server is unreachable a request must fail within seconds (a 503, see
	// db/unavailable.ts), and the pool must find the server again as soon as it is back.
	// connect_timeout: 5 s instead of 30. backoff: postgres.js waits before each reconnect, by
	// default growing to 20 s (3^retries / 100 s), and a query waits with it: requests hung 7-12 s
	// during and after a short outage (scripts/check-db-outage.ts). At most 1 s here.
	const client = postgres(url, {
		max: options.max ?? 10,
		connect_timeout: 5,
		backoff: (retries: number) => Math.min(0.05 * 2 ** retries, 1),
		onnotice: () => {}
	});
	return { db: drizzle(client, { schema, casing: 'snake_case' }), client };
}

export type Db = ReturnType<typeof createDb>['db'];
