import { drizzle } from 'drizzle-orm/postgres-js';
import postgres from 'postgres';
import * as schema from './schema';

export function createDb(url: string, options: { max?: number } = {}) {
	// connect_timeout: while the server is unreachable a request fails within seconds (a 503, see
	// db/unavailable.ts) instead of waiting 30 s; the pool reconnects by itself when it is back.
	const client = postgres(url, { max: options.max ?? 10, connect_timeout: 5, onnotice: () => {} });
	return { db: drizzle(client, { schema, casing: 'snake_case' }), client };
}

export type Db = ReturnType<typeof createDb>['db'];
