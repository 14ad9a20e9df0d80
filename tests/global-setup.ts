// Vitest global set-up: the project's PostgreSQL, a fresh database for this run, migrations.
import { execFileSync } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { startFakeSmtp } from '../scripts/fake-smtp';

const db = (...args: string[]) => execFileSync('bash', ['scripts/db.sh', ...args], { encoding: 'utf8' }).trim();

export default async function setup(project: TestProject) {
	const wasRunning = (() => {
		try {
			db('status');
			return true;
		} catch {
			return false;
		}
	})();
	const url = process.env.DATABASE_URL!; // set in vite.config.ts
	db('recreate', new URL(url).pathname.slice(1));
	execFileSync('node', ['scripts/migrate.js'], { env: { ...process.env, DATABASE_URL: url }, stdio: 'inherit' });
	project.provide('databaseUrl', url);
	const smtp = await startFakeSmtp({ databaseUrl: url, port: Number(new URL(process.env.SMTP_URL!).port) });
	return async () => {
		await smtp.close();
		if (!wasRunning) db('stop');
	};
}

declare module 'vitest' {
	export interface ProvidedContext {
		databaseUrl: string;
	}
}
