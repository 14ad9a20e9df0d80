// Load on loopback: 50 concurrent users against sign-in, the overview, the map's API and its
// tiles, while the worker processes a 1,000,000-fix log. Self-contained: its own database
// (patchbook_load) with the demo farm, its own built app (`node build`, PORT 4199), its own data
// folder. Prints p50/p95/p99 and error counts per kind of request and the job's time.
//   npm run build && npm run bench:load          (BENCH_SECONDS=60 BENCH_USERS=50 BENCH_FIXES=1000000)
// Targets (issue 9): no errors; p95 < 300 ms for pages and the map API, < 100 ms for tiles.
import { execFileSync, spawn } from 'node:child_process';
import { createReadStream, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import autocannon from 'autocannon';
import { eq, sql } from 'drizzle-orm';
import { fieldGeometryColumns } from '../src/lib/geo/field-geometry';
import { tilesForBbox, type Bbox } from '../src/lib/geo/tiles';
import { detectMapping } from '../src/lib/ingest/mapping';
import { createDb } from '../src/lib/server/db/create';
import { farms, fields, machines, memberships, rawFiles, tankMixes, uploads, users } from '../src/lib/server/db/schema';
import { processUploadQueue, startQueue } from '../src/lib/server/jobs/queue';
import * as rawStore from '../src/lib/server/storage/raw-store';
import { BENCH_BOOM, BENCH_FIELD, writeBenchCsv } from './bench';

const users_ = Number(process.env.BENCH_USERS ?? 50);
const signInUsers = Math.max(1, Math.round(users_ / 25)); // 2 of 50 keep signing in, the rest browse
const minSeconds = Number(process.env.BENCH_SECONDS ?? 45);
const fixes = Number(process.env.BENCH_FIXES ?? 1_000_000);
const port = Number(process.env.BENCH_PORT ?? 4199);
const base = `http://127.0.0.1:${port}`;
const email = 'mara@tallowgrass.example';
const password = 'patchbook-demo';

const dir = mkdtempSync(join(tmpdir(), 'pb-load-'));
const dataDir = join(dir, 'data');
process.env.PATCHBOOK_DATA_DIR = dataDir;
const sh = (...args: string[]) => execFileSync('bash', ['scripts/db.sh', ...args], { encoding: 'utf8' }).trim();
sh('start');
sh('recreate', 'patchbook_load');
const url = sh('url', 'patchbook_load');
const env = { ...process.env, DATABASE_URL: url, PATCHBOOK_DATA_DIR: dataDir };
execFileSync('node', ['scripts/migrate.js'], { env, stdio: 'inherit' });
console.log('load: loading the demo farm…');
execFileSync('npx', ['tsx', 'scripts/load-demo.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
const { db, client } = createDb(url, { max: 4 });

// ---------------------------------------------------------------- the app, and its pyramid

const app = spawn('node', ['build'], {
	env: { ...env, HOST: '127.0.0.1', PORT: String(port), ORIGIN: base, BODY_SIZE_LIMIT: 'Infinity', PATCHBOOK_PYRAMID_INTERVAL_MS: '1000' },
	stdio: ['ignore', 'ignore', 'inherit']
});
const stopApp = () => app.kill('SIGTERM');
process.on('exit', stopApp);

async function until(what: string, ok: () => Promise<boolean>, seconds: number) {
	const deadline = Date.now() + seconds * 1000;
	while (!(await ok().catch(() => false))) {
		if (Date.now() > deadline) throw new Error(`load: ${what} did not happen within ${seconds} s`);
		await new Promise((r) => setTimeout(r, 500));
	}
}
await until('the app answering', async () => (await fetch(`${base}/api/health`)).ok, 60);
// The demo farm's tile pyramid is drawn by the worker after start; the load begins once no farm
// needs drawing (the worker's own test), so the figures are of serving, not of first drawing.
process.env.DATABASE_URL = url;
const { farmsNeedingPyramid } = await import('../src/lib/server/map/pyramid-render');
await until('the tile pyramid', async () => (await farmsNeedingPyramid()).length === 0, 600);
const datasets = Number((await db.execute<{ n: number }>(sql`select count(*)::int as n from map_tile_sets`))[0].n);
console.log(`load: app up, tile pyramid ready (${datasets} datasets)`);

// ---------------------------------------------------------------- sessions and paths

async function signIn(): Promise<{ status: number; cookie: string }> {
	const res = await fetch(`${base}/login`, {
		method: 'POST',
		redirect: 'manual',
		headers: { accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded', origin: base },
		body: new URLSearchParams({ email, password })
	});
	return { status: res.status, cookie: res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ') };
}
const cookies: string[] = [];
for (let i = 0; i < users_; i++) {
	const s = await signIn();
	if (s.status !== 303 || !s.cookie) throw new Error(`load: sign-in answered ${s.status}`);
	cookies.push(s.cookie);
}

const [farm] = await db.select().from(farms).where(eq(farms.slug, 'tallowgrass'));
const farmFields = await db.select({ boundary: fields.boundary }).from(fields).where(eq(fields.farmId, farm.id));
const coords = farmFields.flatMap((f) => (f.boundary.type === 'Polygon' ? f.boundary.coordinates.flat() : f.boundary.coordinates.flat(2)));
const bbox: Bbox = [Math.min(...coords.map((c) => c[0])), Math.min(...coords.map((c) => c[1])), Math.max(...coords.map((c) => c[0])), Math.max(...coords.map((c) => c[1]))];
const tiles: string[] = [];
for (let z = 12; z <= 16; z++) for (const [tz, tx, ty] of tilesForBbox(bbox, z)) tiles.push(`/api/farms/tallowgrass/tiles/cells/${tz}/${tx}/${ty}?season=2026`);
// What a person on the map does: the overview, the map page's data, then a screenful of tiles.
const pages = ['/tallowgrass', '/tallowgrass/map'];
const api = ['/api/farms/tallowgrass/map/meta', '/api/farms/tallowgrass/map/summary?season=2026', '/api/farms/tallowgrass/fields'];

// ---------------------------------------------------------------- the 1M-fix log, queued

const csv = join(dir, 'load-log.csv');
await writeBenchCsv(csv, { count: fixes, seed: 7 });
const stored = await rawStore.put(createReadStream(csv), 2e9);
const [mara] = await db.select().from(users).where(eq(users.email, email));
const [benchFarm] = await db.insert(farms).values({ slug: 'load-bench', name: 'Load bench farm' }).returning();
await db.insert(memberships).values({ farmId: benchFarm.id, userId: mara.id, role: 'manager' });
await db.insert(fields).values({ farmId: benchFarm.id, name: 'Bench field', ...fieldGeometryColumns(BENCH_FIELD) });
const [machine] = await db.insert(machines).values({ farmId: benchFarm.id, name: 'Bench boom', ...BENCH_BOOM }).returning();
const [mix] = await db.insert(tankMixes).values({ farmId: benchFarm.id, name: 'Bench mix', carrierRateLPerM2: 0.01 }).returning();
await db.insert(rawFiles).values(stored).onConflictDoNothing();
const mapping = detectMapping('time,lat,lon,speed_kmh,rate_lha,nozzles'.split(','), []);
const [upload] = await db
	.insert(uploads)
	.values({ farmId: benchFarm.id, uploadedBy: mara.id, fileName: 'load-log.csv', format: 'csv', ...stored, mapping: mapping as unknown as Record<string, unknown>, machineId: machine.id, tankMixId: mix.id, status: 'queued' })
	.returning();

// ---------------------------------------------------------------- the load

type Kind = 'sign-in' | 'page' | 'api' | 'tile';
const times: Record<Kind, number[]> = { 'sign-in': [], page: [], api: [], tile: [] };
const statuses: Record<Kind, Map<number, number>> = { 'sign-in': new Map(), page: new Map(), api: new Map(), tile: new Map() };
const expected: Record<Kind, number[]> = { 'sign-in': [303], page: [200], api: [200], tile: [200, 204, 304] };
let errors = 0;
let timeouts = 0;

function run(connections: number, kindOf: (i: number) => { kind: Kind; path: string; method?: string; body?: string; headers?: Record<string, string> }, seconds: number, first: number) {
	let counter = 0;
	const instance = autocannon({
		url: base,
		connections,
		duration: seconds,
		timeout: 10,
		requests: [
			{
				setupRequest: (req: Record<string, unknown>, context: Record<string, unknown>) => {
					// Each connection is one person: its own session, its own walk through the paths.
					context.user ??= first + (counter++ % connections);
					context.step = ((context.step as number | undefined) ?? Math.floor(Math.random() * 1000)) + 1;
					const r = kindOf(context.step as number);
					context.kind = r.kind;
					return {
						...req,
						method: r.method ?? 'GET',
						path: r.path,
						body: r.body,
						// Sign-in and pages ask for HTML: a form action answers others in SvelteKit's own format.
						headers: { 'accept-encoding': 'gzip', accept: r.kind === 'page' || r.kind === 'sign-in' ? 'text/html' : '*/*', ...(r.headers ?? {}), cookie: r.kind === 'sign-in' ? '' : cookies[context.user as number] }
					};
				}
			}
		]
	} as autocannon.Options);
	instance.on('response', (client: { requestIterator?: { context?: { kind?: Kind } } }, status: number, _bytes: number, ms: number) => {
		const kind = client.requestIterator?.context?.kind ?? 'page';
		times[kind].push(ms);
		statuses[kind].set(status, (statuses[kind].get(status) ?? 0) + 1);
	});
	instance.on('reqError', () => errors++);
	instance.on('timeout' as 'done', () => timeouts++);
	return instance;
}

const browse = (step: number) => {
	const i = step % 10;
	if (i === 0) return { kind: 'page' as const, path: pages[step % pages.length] };
	if (i <= 2) return { kind: 'api' as const, path: api[step % api.length] };
	return { kind: 'tile' as const, path: tiles[(step * 7919) % tiles.length] };
};
const login = () => ({
	kind: 'sign-in' as const,
	path: '/login',
	method: 'POST',
	body: new URLSearchParams({ email, password }).toString(),
	headers: { 'content-type': 'application/x-www-form-urlencoded', origin: base, accept: 'text/html' }
});

const boss = await startQueue(url, 'app');
const queuedAt = performance.now();
await boss.send(processUploadQueue, { uploadId: upload.id }, { singletonKey: upload.id });
let jobMs = NaN;
const watch = (async () => {
	for (;;) {
		const [u] = await db.select({ status: uploads.status, error: uploads.error }).from(uploads).where(eq(uploads.id, upload.id));
		if (u.status === 'done' || u.status === 'failed') {
			jobMs = performance.now() - queuedAt;
			if (u.status === 'failed') console.log(`load: the 1M-fix job failed: ${u.error}`);
			return u.status;
		}
		await new Promise((r) => setTimeout(r, 250));
	}
})();

console.log(`load: ${users_} users (${signInUsers} signing in, ${users_ - signInUsers} browsing) for at least ${minSeconds} s while ${fixes.toLocaleString('en')} fixes process…`);
// Rounds of load until the job is done and the minimum time has passed.
const started = performance.now();
let jobStatus: string | null = null;
void watch.then((s) => (jobStatus = s));
while (jobStatus === null || performance.now() - started < minSeconds * 1000) {
	const left = Math.max(10, Math.ceil(minSeconds - (performance.now() - started) / 1000));
	await Promise.all([run(users_ - signInUsers, browse, Math.min(left, 20), signInUsers), run(signInUsers, login, Math.min(left, 20), 0)]);
	if (performance.now() - started > 600_000) break;
}
const loadSeconds = (performance.now() - started) / 1000;
await boss.stop({ graceful: false });

// ---------------------------------------------------------------- report

const pct = (sorted: number[], p: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN);
const target: Record<Kind, number> = { 'sign-in': 300, page: 300, api: 300, tile: 100 };
console.log(`\nload: ${loadSeconds.toFixed(0)} s of load; the 1M-fix job ${jobStatus ?? 'not finished'} after ${(jobMs / 1000).toFixed(1)} s`);
console.log('kind      requests   p50 ms   p95 ms   p99 ms   target p95   unexpected statuses');
let unexpected = 0;
for (const kind of Object.keys(times) as Kind[]) {
	const t = times[kind].sort((a, b) => a - b);
	const bad = [...statuses[kind]].filter(([s]) => !expected[kind].includes(s));
	unexpected += bad.reduce((s, [, n]) => s + n, 0);
	console.log(
		`${kind.padEnd(9)} ${String(t.length).padStart(8)} ${pct(t, 50).toFixed(0).padStart(8)} ${pct(t, 95).toFixed(0).padStart(8)} ${pct(t, 99).toFixed(0).padStart(8)} ${`< ${target[kind]}`.padStart(12)} ${pct(t, 95) < target[kind] ? 'met ' : 'MISSED'}  ${bad.map(([s, n]) => `${s}×${n}`).join(' ') || 'none'}`
	);
}
console.log(`connection errors ${errors}, timeouts ${timeouts}, unexpected statuses ${unexpected}`);
const load = execFileSync('cat', ['/proc/loadavg'], { encoding: 'utf8' }).split(' ').slice(0, 3).join(' ');
console.log(`machine: ${execFileSync('nproc', { encoding: 'utf8' }).trim()} cores, load average ${load}`);

await client.end();
stopApp();
rmSync(dir, { recursive: true, force: true });
process.exit(errors + timeouts + unexpected > 0 ? 1 : 0);
