// Shared by the crash checks (check-crash.ts, check-db-outage.ts): a fresh database, a farm to
// upload into, the built app started the way scripts/e2e-server.sh starts it, and sign-in over HTTP.
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { createWriteStream, existsSync } from 'node:fs';
import { fieldGeometryColumns } from '../src/lib/geo/field-geometry';
import { hashPassword } from '../src/lib/server/auth/password';
import type { Db } from '../src/lib/server/db/create';
import { farms, fields, machines, memberships, tankMixes, users } from '../src/lib/server/db/schema';
import { BENCH_BOOM, BENCH_FIELD } from './bench';

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export function dbSh(...args: string[]): string {
	return execFileSync('bash', ['scripts/db.sh', ...args], { encoding: 'utf8' }).trim();
}

/** A fresh, migrated database on the project's cluster (PGPORT); returns its URL. */
export function freshDatabase(name: string): string {
	dbSh('recreate', name);
	const url = dbSh('url', name);
	execFileSync('node', ['scripts/migrate.js'], { env: { ...process.env, DATABASE_URL: url }, stdio: ['ignore', 'ignore', 'inherit'] });
	return url;
}

/** The throwaway checks' sign-in: made fresh each run, so no credential sits in the source. */
export const password = randomBytes(18).toString('base64url');

/** A farm with a manager, the bench field, boom and a tank mix, so an uploaded bench log can be processed. */
export async function makeFarm(db: Db, slug: string) {
	const email = `${slug}@crash.example`;
	const [user] = await db.insert(users).values({ id: `u-${slug}`, email, name: slug, passwordHash: await hashPassword(password) }).returning();
	const [farm] = await db.insert(farms).values({ slug, name: slug }).returning();
	await db.insert(memberships).values({ farmId: farm.id, userId: user.id, role: 'manager' });
	await db.insert(fields).values({ farmId: farm.id, name: 'Field', ...fieldGeometryColumns(BENCH_FIELD) });
	const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', ...BENCH_BOOM }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	return { farm, user, email, machine, mix };
}

// Every app this process started is killed when it exits, whatever went wrong.
const started = new Set<ChildProcess>();
process.on('exit', () => {
	for (const c of started) {
		try {
			process.kill(-c.pid!, 'SIGKILL');
		} catch {
			// gone already
		}
	}
});

export type App = { process: ChildProcess; origin: string; log: string };

/**
 * `node build` in its own process group (so kill -9 of the group takes its worker too, like a
 * machine losing power), waiting until /api/health answers. Output goes to `log`.
 */
export async function startApp(options: { port: number; databaseUrl: string; dataDir: string; log: string }): Promise<App> {
	if (!existsSync('build/index.js')) throw new Error('No build: run `npm run build` first.');
	const origin = `http://127.0.0.1:${options.port}`;
	const busy = await fetch(`${origin}/api/health`).then(
		() => true,
		() => false
	);
	if (busy) throw new Error(`port ${options.port} is in use by another server; stop it or set another port`);
	const out = createWriteStream(options.log, { flags: 'a' });
	const child = spawn('node', ['build'], {
		detached: true,
		stdio: ['ignore', 'pipe', 'pipe'],
		env: {
			...process.env,
			DATABASE_URL: options.databaseUrl,
			PATCHBOOK_DATA_DIR: options.dataDir,
			HOST: '127.0.0.1',
			PORT: String(options.port),
			ORIGIN: origin,
			BODY_SIZE_LIMIT: 'Infinity',
			PATCHBOOK_PYRAMID: 'off',
			PATCHBOOK_WORKER_NICE: '0'
		}
	});
	started.add(child);
	child.stdout!.pipe(out);
	child.stderr!.pipe(out);
	const t0 = Date.now();
	for (;;) {
		if (child.exitCode !== null) throw new Error(`the app exited (${child.exitCode}); see ${options.log}`);
		try {
			const r = await fetch(`${origin}/api/health`);
			if (r.status === 200) break;
		} catch {
			// not listening yet
		}
		if (Date.now() - t0 > 60_000) throw new Error(`the app did not answer within 60 s; see ${options.log}`);
		await sleep(200);
	}
	return { process: child, origin, log: options.log };
}

/** SIGKILL to the app and its worker at once: nothing gets to clean up. */
export async function killApp(app: App): Promise<void> {
	try {
		process.kill(-app.process.pid!, 'SIGKILL');
	} catch {
		// already gone
	}
	if (app.process.exitCode === null && app.process.signalCode === null) await new Promise((r) => app.process.once('exit', r));
}

/** Signs in through the login form; returns the Cookie header to send. */
export async function signIn(origin: string, email: string): Promise<string> {
	const r = await fetch(`${origin}/login`, {
		method: 'POST',
		redirect: 'manual',
		headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html', origin },
		body: new URLSearchParams({ email, password })
	});
	const cookie = r.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
	if (r.status !== 303 || !cookie) throw new Error(`sign-in failed: ${r.status} ${(await r.text()).replace(/<[^>]*>/g, ' ').replace(/\s+/g, ' ').slice(0, 300)}`);
	return cookie;
}
