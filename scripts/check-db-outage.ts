// PostgreSQL stopped and started again under the running built app (`npm run build` first):
// during the outage pages answer 503 with a plain sentence and APIs 503 JSON, quickly, with no
// stack or SQL; afterwards the same app process answers normally and its worker processes a new
// upload. Prints every status it saw and the recovery time; exits 1 on any failed check.
// Run: npm run check:db-outage. It stops and starts THE PROJECT'S OWN CLUSTER (PGPORT, via
// scripts/db.sh): do not run it while tests use that cluster. App port OUTAGE_PORT (default 4292).
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import { detectMapping } from '../src/lib/ingest/mapping';
import { createDb } from '../src/lib/server/db/create';
import { uploads } from '../src/lib/server/db/schema';
import { writeBenchCsv } from './bench';
import { dbSh, freshDatabase, killApp, makeFarm, signIn, sleep, startApp } from './check-support';

const port = Number(process.env.OUTAGE_PORT ?? 4292);
const outageSeconds = Number(process.env.OUTAGE_SECONDS ?? 8);
const dir = mkdtempSync(join(tmpdir(), 'pb-outage-'));
const log = join(dir, 'app.log');
const url = freshDatabase('patchbook_outage');
let setup = createDb(url, { max: 2 });
const farm = await makeFarm(setup.db, 'outage');
await setup.client.end();

const app = await startApp({ port, databaseUrl: url, dataDir: join(dir, 'data'), log });
const cookie = await signIn(app.origin, farm.email);
const problems: string[] = [];
const check = (ok: boolean, what: string) => {
	console.log(`db-outage: ${ok ? 'ok  ' : 'FAIL'} ${what}`);
	if (!ok) problems.push(what);
};

// What a person and a program ask for: the farm's overview page, a client-side navigation's
// data, the uploads API, the health check.
const probes = [
	{ name: `page /${farm.farm.slug}`, path: `/${farm.farm.slug}`, json: false },
	{ name: 'data __data.json', path: `/${farm.farm.slug}/fields/__data.json`, json: true },
	{ name: 'API uploads', path: `/api/farms/${farm.farm.slug}/uploads`, json: true },
	{ name: 'API health', path: '/api/health', json: true }
];
type Seen = { name: string; status: number | string; ms: number; type: string; body: string };
async function probe(p: (typeof probes)[number]): Promise<Seen> {
	const t0 = Date.now();
	try {
		const r = await fetch(app.origin + p.path, { headers: { cookie, accept: p.json ? 'application/json' : 'text/html' }, signal: AbortSignal.timeout(15_000) });
		return { name: p.name, status: r.status, ms: Date.now() - t0, type: r.headers.get('content-type') ?? '', body: await r.text() };
	} catch (e) {
		return { name: p.name, status: (e as Error).name, ms: Date.now() - t0, type: '', body: '' };
	}
}
const show = (s: Seen) => `${s.name} ${s.status} in ${s.ms} ms`;
// Anything that looks like an internal: a stack frame, SQL, a driver's error name.
const leaks = (body: string) => /\bat .+:\d+:\d+|select |insert |PostgresError|ECONNREFUSED|DrizzleQueryError|node_modules/i.test(body);

const before = await Promise.all(probes.map(probe));
console.log(`db-outage: before: ${before.map(show).join(', ')}`);
check(before.every((s) => s.status === 200), 'everything answers 200 before the outage');

const workerPids = () => [...readFileSync(log, 'utf8').matchAll(/\[worker (\d+)\] waiting for jobs/g)].map((m) => Number(m[1]));
for (let i = 0; i < 300 && !workerPids().length; i++) await sleep(100);
const workerBefore = workerPids().at(-1);

const stopT = Date.now();
dbSh('stop');
console.log(`db-outage: PostgreSQL stopped (${Date.now() - stopT} ms); probing for ${outageSeconds} s`);
const during: Seen[] = [];
const outageEnd = Date.now() + outageSeconds * 1000;
while (Date.now() < outageEnd) {
	during.push(...(await Promise.all(probes.map(probe))));
	await sleep(500);
}
for (const p of probes) {
	const mine = during.filter((s) => s.name === p.name);
	const statuses = [...new Set(mine.map((s) => s.status))].join('/');
	const slowest = Math.max(...mine.map((s) => s.ms));
	console.log(`db-outage: during: ${p.name}: ${mine.length} requests, status ${statuses}, slowest ${slowest} ms`);
	check(mine.every((s) => s.status === 503), `${p.name}: every answer during the outage is 503`);
	check(slowest < 6000, `${p.name}: no answer took more than 6 s`);
	check(mine.every((s) => (p.json ? s.type.startsWith('application/json') : s.type.startsWith('text/html'))), `${p.name}: ${p.json ? 'JSON' : 'an HTML page'}`);
	check(mine.every((s) => !leaks(s.body)), `${p.name}: no stack, SQL or driver error in the body`);
}
const sample = during.find((s) => s.name === probes[0].name)?.body.replace(/<[^>]*>/g, ' ').replace(/\s+/g, ' ').trim();
console.log(`db-outage: the page says: "${sample}"`);
console.log(`db-outage: the API says: ${during.find((s) => s.name === 'API uploads')?.body}`);

const startT = Date.now();
dbSh('start');
const upT = Date.now();
console.log(`db-outage: PostgreSQL started again (${((upT - startT) / 1000).toFixed(1)} s)`);
let recovered = 0;
for (;;) {
	const r = await probe(probes[0]);
	if (r.status === 200) {
		recovered = Date.now() - upT;
		break;
	}
	if (Date.now() - upT > 60_000) break;
	await sleep(100);
}
check(recovered > 0, `the same app process answers the page again ${recovered} ms after PostgreSQL is back`);
const after = await Promise.all(probes.map(probe));
console.log(`db-outage: after: ${after.map(show).join(', ')}`);
check(after.every((s) => s.status === 200), 'everything answers 200 after the outage, without restarting the app');
check(app.process.exitCode === null && app.process.signalCode === null, `the app process (pid ${app.process.pid}) never stopped`);

// The worker: still the same process, or restarted by the app; either way a new upload is processed.
const csv = join(dir, 'log.csv');
await writeBenchCsv(csv, { count: 20_000 });
const put = await fetch(`${app.origin}/api/farms/${farm.farm.slug}/uploads?name=log.csv`, { method: 'POST', headers: { cookie, 'content-type': 'text/csv' }, body: readFileSync(csv) });
const accepted = (await put.json()) as { id: string };
const action = await fetch(`${app.origin}/${farm.farm.slug}/uploads/${accepted.id}?/process`, {
	method: 'POST',
	headers: { cookie, origin: app.origin, 'content-type': 'application/x-www-form-urlencoded', 'x-sveltekit-action': 'true' },
	body: new URLSearchParams({
		machineId: farm.machine.id,
		tankMixId: farm.mix.id,
		mapping: JSON.stringify(detectMapping('time,lat,lon,speed_kmh,rate_lha,nozzles'.split(','), [])),
		onlyDays: ''
	})
});
check(action.status === 200, `an upload after the outage is accepted (HTTP ${put.status}) and queued (HTTP ${action.status})`);
setup = createDb(url, { max: 1 });
const t0 = Date.now();
let status = '';
while (Date.now() - t0 < 120_000) {
	[{ status }] = await setup.db.select({ status: uploads.status }).from(uploads).where(eq(uploads.id, accepted.id));
	if (status === 'done' || status === 'failed') break;
	await sleep(250);
}
const workerAfter = workerPids().at(-1);
const appLog = readFileSync(log, 'utf8');
console.log(`db-outage: app log: ${(appLog.match(/\[db\] unavailable/g) ?? []).length} requests answered 503, ${(appLog.match(/\[queue /g) ?? []).length} queue errors logged, ${(appLog.match(/worker exited/g) ?? []).length} worker restarts, ${(appLog.match(/\[error /g) ?? []).length} unexpected errors`);
check(status === 'done', `the worker processed it: ${status} in ${((Date.now() - t0) / 1000).toFixed(1)} s (worker pid ${workerBefore} before, ${workerAfter} after: ${workerBefore === workerAfter ? 'survived' : 'restarted by the app'})`);
await setup.client.end();
await killApp(app);
console.log(problems.length ? `db-outage: ${problems.length} problem(s); app log ${log}` : `db-outage: all checks passed (app log ${log})`);
process.exit(problems.length ? 1 : 0);
