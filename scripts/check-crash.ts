// The app killed (kill -9 of the app and its worker together) during an upload, through the real
// HTTP routes of the built app (`npm run build` first):
//   1. cut mid-transfer: nothing visible afterwards (no upload row, no stored file), and the same
//      person can upload the file again;
//   2. killed while the accepted upload is processing: no half import (no applications or cell
//      results), the raw file kept; after a restart the job is retried and its figures equal an
//      uninterrupted run's.
// Prints what it saw; exits 1 on any difference. Run: npm run check:crash [-- fixes]
// Uses PGPORT's cluster (database patchbook_crash) and app port CRASH_PORT (default 4291).
import { createHash } from 'node:crypto';
import { createReadStream, mkdtempSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { and, eq, sql } from 'drizzle-orm';
import { detectMapping } from '../src/lib/ingest/mapping';
import { createDb } from '../src/lib/server/db/create';
import { applicationFixes, applications, cellResults, rawFiles, uploads } from '../src/lib/server/db/schema';
import { processUpload } from '../src/lib/server/ingest/process-upload';
import * as rawStore from '../src/lib/server/storage/raw-store';
import { writeBenchCsv } from './bench';
import { freshDatabase, killApp, makeFarm, signIn, sleep, startApp, type App } from './check-support';

const count = Number(process.argv[2] ?? 300_000);
const port = Number(process.env.CRASH_PORT ?? 4291);
const dir = mkdtempSync(join(tmpdir(), 'pb-crash-'));
const appData = join(dir, 'app-data');
const log = join(dir, 'app.log');
const url = freshDatabase('patchbook_crash');
const { db, client } = createDb(url, { max: 4 });
const problems: string[] = [];
const check = (ok: boolean, what: string) => {
	console.log(`crash: ${ok ? 'ok  ' : 'FAIL'} ${what}`);
	if (!ok) problems.push(what);
};

const csv = join(dir, 'log.csv');
await writeBenchCsv(csv, { count });
const bytes = readFileSync(csv);
const sha256 = createHash('sha256').update(bytes).digest('hex');
console.log(`crash: log of ${count} fixes, ${(bytes.length / 1e6).toFixed(1)} MB, sha256 ${sha256.slice(0, 12)}…`);

// The reference: the same bytes processed without interruption, in this process, in its own data dir.
process.env.PATCHBOOK_DATA_DIR = join(dir, 'reference-data');
const reference = await makeFarm(db, 'reference');
const stored = await rawStore.put(createReadStream(csv), 2e9);
await db.insert(rawFiles).values(stored).onConflictDoNothing();
const mapping = detectMapping('time,lat,lon,speed_kmh,rate_lha,nozzles'.split(','), []);
const [refUpload] = await db
	.insert(uploads)
	.values({ farmId: reference.farm.id, fileName: 'log.csv', format: 'csv', ...stored, mapping: mapping as never, machineId: reference.machine.id, tankMixId: reference.mix.id, status: 'queued' })
	.returning();
await processUpload(db, refUpload.id, async () => {});
process.env.PATCHBOOK_DATA_DIR = appData;

async function figures(farmId: string) {
	const apps = await db
		.select({ day: applications.day, coveredM2: applications.coveredM2, sprayedM2: applications.sprayedM2, volumeL: applications.volumeL })
		.from(applications)
		.where(eq(applications.farmId, farmId))
		.orderBy(applications.day);
	const [cells] = await db
		.select({ n: sql<number>`count(*)::int`, covered: sql<number>`coalesce(sum(${cellResults.coveredM2}), 0)`, volume: sql<number>`coalesce(sum(${cellResults.volumeL}), 0)` })
		.from(cellResults)
		.innerJoin(applications, eq(applications.id, cellResults.applicationId))
		.where(eq(applications.farmId, farmId));
	const [fixes] = await db
		.select({ n: sql<number>`count(*)::int` })
		.from(applicationFixes)
		.innerJoin(applications, eq(applications.id, applicationFixes.applicationId))
		.where(eq(applications.farmId, farmId));
	return { apps, cells, fixLinks: fixes.n };
}
const expected = await figures(reference.farm.id);
console.log(`crash: uninterrupted run: ${expected.apps.length} applications, ${expected.cells.n} cell results`);

const farm = await makeFarm(db, 'crashed');
const rawFilesIn = (sub: string) => {
	try {
		return readdirSync(join(appData, 'raw', sub), { recursive: true }).filter((f) => statSync(join(appData, 'raw', sub, String(f))).isFile()).length;
	} catch {
		return 0;
	}
};

// 1. Cut mid-transfer: the body is sent slowly; at half the bytes the app is killed.
let app: App = await startApp({ port, databaseUrl: url, dataDir: appData, log });
let cookie = await signIn(app.origin, farm.email);
{
	const half = Math.floor(bytes.length / 2);
	const answer = new Promise<string>((resolve) => {
		const req = request(`${app.origin}/api/farms/${farm.farm.slug}/uploads?name=log.csv`, { method: 'POST', headers: { cookie, 'content-type': 'text/csv', 'content-length': bytes.length } });
		req.on('response', (r) => resolve(`HTTP ${r.statusCode}`));
		req.on('error', (e) => resolve((e as NodeJS.ErrnoException).code ?? e.message));
		let sent = 0;
		const chunk = 256 * 1024;
		const pump = () => {
			if (sent >= half) return; // stall here until the app is killed
			req.write(bytes.subarray(sent, sent + chunk), () => setTimeout(pump, 5));
			sent += chunk;
		};
		pump();
	});
	await sleep(1500);
	await killApp(app);
	const seen = await answer;
	const rows = await db.select().from(uploads).where(eq(uploads.farmId, farm.farm.id));
	check(rows.length === 0, `transfer cut at ${(half / 1e6).toFixed(1)} of ${(bytes.length / 1e6).toFixed(1)} MB (client saw ${seen}): no upload row`);
	check(rawFilesIn('') - rawFilesIn('tmp') === 0, `transfer cut: no file in the raw store (${rawFilesIn('tmp')} partial file(s) left under raw/tmp, never listed)`);
}

// 2. Restart; upload the whole file again, ask for processing, kill while it processes.
let t = Date.now();
app = await startApp({ port, databaseUrl: url, dataDir: appData, log });
console.log(`crash: app restarted in ${((Date.now() - t) / 1000).toFixed(1)} s`);
cookie = await signIn(app.origin, farm.email);
const listed = (await (await fetch(`${app.origin}/api/farms/${farm.farm.slug}/uploads`, { headers: { cookie } })).json()) as { uploads: unknown[] };
check(listed.uploads.length === 0, 'after the cut transfer the uploads list is empty');
const put = await fetch(`${app.origin}/api/farms/${farm.farm.slug}/uploads?name=log.csv`, { method: 'POST', headers: { cookie, 'content-type': 'text/csv' }, body: bytes });
const accepted = (await put.json()) as { id: string; status: string };
check(put.status === 201, `the same file uploaded again: HTTP ${put.status}, status ${accepted.status}`);
const processed = await fetch(`${app.origin}/${farm.farm.slug}/uploads/${accepted.id}?/process`, {
	method: 'POST',
	headers: { cookie, origin: app.origin, 'content-type': 'application/x-www-form-urlencoded', 'x-sveltekit-action': 'true' },
	body: new URLSearchParams({ machineId: farm.machine.id, tankMixId: farm.mix.id, mapping: JSON.stringify(mapping), onlyDays: '' })
});
const action = (await processed.json()) as { type: string };
check(action.type === 'success', `processing asked for through the page's action: ${action.type}`);
t = Date.now();
let killedAt = 0;
for (;;) {
	const [u] = await db.select().from(uploads).where(eq(uploads.id, accepted.id));
	if (u.status === 'processing' && u.progress >= 0.4) {
		killedAt = u.progress;
		break;
	}
	if (u.status === 'done' || u.status === 'failed') throw new Error(`the job ended (${u.status}) before it could be killed; use a larger log`);
	if (Date.now() - t > 180_000) throw new Error('the job never got under way');
	await sleep(100);
}
await killApp(app);
console.log(`crash: app and worker killed (SIGKILL) with the job at ${Math.round(killedAt * 100)} % (${((Date.now() - t) / 1000).toFixed(1)} s after the request)`);
{
	const half = await figures(farm.farm.id);
	check(half.apps.length === 0 && half.cells.n === 0 && half.fixLinks === 0, `no half import: ${half.apps.length} applications, ${half.cells.n} cell results, ${half.fixLinks} fix links`);
	const kept = readFileSync(rawStore.pathOf(sha256));
	check(createHash('sha256').update(kept).digest('hex') === sha256, 'the raw upload is kept, byte for byte (SHA-256)');
}

// 3. Restart: the interrupted job is retried and ends with the uninterrupted run's figures.
t = Date.now();
app = await startApp({ port, databaseUrl: url, dataDir: appData, log });
let final;
for (;;) {
	[final] = await db.select().from(uploads).where(and(eq(uploads.id, accepted.id), eq(uploads.farmId, farm.farm.id)));
	if (final.status === 'done' || final.status === 'failed') break;
	if (Date.now() - t > 300_000) break;
	await sleep(250);
}
const got = await figures(farm.farm.id);
console.log(`crash: after the restart the upload is ${final?.status} in ${((Date.now() - t) / 1000).toFixed(1)} s (attempts ${final?.attempts})`);
const same =
	got.apps.length === expected.apps.length &&
	got.apps.every((a, i) => a.day === expected.apps[i].day && a.coveredM2 === expected.apps[i].coveredM2 && a.sprayedM2 === expected.apps[i].sprayedM2 && a.volumeL === expected.apps[i].volumeL) &&
	got.cells.n === expected.cells.n &&
	Math.abs(got.cells.covered - expected.cells.covered) < 1e-6 * expected.cells.covered &&
	Math.abs(got.cells.volume - expected.cells.volume) < 1e-6 * Math.max(expected.cells.volume, 1);
check(final?.status === 'done' && same, `${got.apps.length} applications and ${got.cells.n} cell results, equal to the uninterrupted run's`);
cookie = await signIn(app.origin, farm.email);
const again = await fetch(`${app.origin}/api/farms/${farm.farm.slug}/uploads?name=log.csv`, { method: 'POST', headers: { cookie, 'content-type': 'text/csv' }, body: bytes });
check(again.status === 200 && ((await again.json()) as { duplicate: boolean }).duplicate, `uploading the same file once more is recognised as a duplicate (HTTP ${again.status}), nothing counted twice`);

await killApp(app);
await client.end();
console.log(problems.length ? `crash: ${problems.length} problem(s); app log ${log}` : `crash: all checks passed (app log ${log})`);
process.exit(problems.length ? 1 : 0);
