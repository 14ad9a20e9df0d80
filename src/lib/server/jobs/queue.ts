// The job queue: pg-boss on the app's own PostgreSQL, so jobs survive restarts and any number
// of worker processes can share one queue. Imports no SvelteKit modules: the worker process
// runs outside SvelteKit.
import PgBoss from 'pg-boss';

export const processUploadQueue = 'process-upload';

export type ProcessUploadJob = { uploadId: string };

/**
 * A started pg-boss. The app only sends (no maintenance); workers also supervise.
 * A job whose worker dies is expired after `expireInSeconds` and retried up to `retryLimit`.
 */
export async function startQueue(connectionString: string, role: 'app' | 'worker'): Promise<PgBoss> {
	const boss = new PgBoss({
		connectionString,
		max: role === 'app' ? 2 : 4,
		supervise: role === 'worker',
		schedule: false
	});
	// One line per error: while the database is away pg-boss reports every failed poll, and the
	// full error object (with its pg client) runs to a hundred lines.
	boss.on('error', (e: Error & { code?: string }) => console.error(`[queue ${role}] ${e.code ? `${e.code} ` : ''}${e.message}`));
	await boss.start();
	await boss.createQueue(processUploadQueue, {
		name: processUploadQueue,
		retryLimit: 3,
		retryDelay: 5,
		// A job whose worker died is retried after this; a million-fix log takes well under a minute.
		expireInSeconds: 5 * 60
	});
	return boss;
}
