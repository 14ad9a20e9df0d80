// Vitest global set-up: the project's PostgreSQL, a fresh database for this run, migrations.
import { execFileSync } from 'node:child_process';
import type { TestProject } from 'vitest/node';

const db = (...args: string[]) => execFileSync('bash', ['scripts/db.sh', ...args], { encoding: 'utf8' }).trim();

export default function setup(project: TestProject) {
	const wasRunning = (() => {
		try {
			db('status');
			return true;
		} catch {
			return false;
		}
	})();
	db('recreate', 'patchbook_vitest');
	const url = db('url', 'patchbook_vitest');
	execFileSync('node', ['scripts/migrate.js'], { env: { ...process.env, DATABASE_URL: url }, stdio: 'inherit' });
	process.env.DATABASE_URL = url;
	project.provide('databaseUrl', url);
	return () => {
		if (!wasRunning) db('stop');
	};
}

declare module 'vitest' {
	export interface ProvidedContext {
		databaseUrl: string;
	}
}
