// A worker killed in the middle of a job: the job is retried by the next worker and the figures
// equal an uninterrupted run's. Prints what it saw; exits 1 when the figures differ or the job
// never finishes. Run: npx tsx scripts/check-restart.ts [fixes]
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { createReadStream, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq, sql } from 'drizzle-orm';
import { fieldGeometryColumns } from '../src/lib/geo/field-geometry';
import { detectMapping } from '../src/lib/ingest/mapping';
import { createDb } from '../src/lib/server/db/create';
import { applications, cellResults, farms, fields, machines, rawFiles, tankMixes, uploads } from '../src/lib/server/db/schema';
import { processUpload } from '../src/lib/server/ingest/process-upload';
import { processUploadQueue, startQueue } from '../src/lib/server/jobs/queue';
import * as rawStore from '../src/lib/server/storage/raw-store';
import { BENCH_BOOM, BENCH_FIELD, writeBenchCsv } from './bench';

const count = Number(process.argv[2] ?? 300_000);
const dir = mkdtempSync(join(tmpdir(), 'pb-restart-'));
process.env.PATCHBOOK_DATA_DIR = join(dir, 'data');
const sh = (...args: string[]) => execFileSync('bash', ['scripts/db.sh', ...args], { encoding: 'utf8' }).trim();
sh('recreate', 'patchbook_restart');
const url = sh('url', 'patchbook_restart');
execFileSync('node', ['scripts/migrate.js'], { env: { ...process.env, DATABASE_URL: url }, stdio: 'inherit' });
const { db, client } = createDb(url, { max: 4 });

async function makeUpload(slug: string, sha: { sha256: string; sizeBytes: number }) {
	const [farm] = await db.insert(farms).values({ slug, name: slug }).returning();
	await db.insert(fields).values({ farmId: farm.id, name: 'Field', ...fieldGeometryColumns(BENCH_FIELD) });
	const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', ...BENCH_BOOM }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	const mapping = detectMapping('time,lat,lon,speed_kmh,rate_lha,nozzles'.split(','), []);
	const [u] = await db
		.insert(uploads)
		.values({ farmId: farm.id, fileName: 'log.csv', format: 'csv', ...sha, mapping: mapping as never, machineId: machine.id, tankMixId: mix.id, status: 'queued' })
		.returning();
	return { farm, upload: u };
}

function worker(): ChildProcess {
	return spawn('node', ['--import', 'tsx', 'src/lib/server/jobs/worker-main.ts'], {
		env: { ...process.env, DATABASE_URL: url, PATCHBOOK_WORKER_SOLE: '1' },
		stdio: ['ignore', 'inherit', 'inherit']
	});
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const csv = join(dir, 'log.csv');
await writeBenchCsv(csv, { count });
const stored = await rawStore.put(createReadStream(csv), 2e9);
await db.insert(rawFiles).values(stored);

// The reference: the same upload processed without interruption.
const reference = await makeUpload('reference', stored);
await processUpload(db, reference.upload.id, async () => {});
const expected = await db.select().from(applications).where(eq(applications.farmId, reference.farm.id)).orderBy(applications.day);
// Per-cell results too, not only the totals: a retried job must not leave a cell counted twice.
const cellsOf = async (farmId: string) =>
	(
		await db
			.select({ n: sql<number>`count(*)::int`, covered: sql<number>`coalesce(sum(${cellResults.coveredM2}), 0)`, volume: sql<number>`coalesce(sum(${cellResults.volumeL}), 0)` })
			.from(cellResults)
			.innerJoin(applications, eq(applications.id, cellResults.applicationId))
			.where(eq(applications.farmId, farmId))
	)[0];
const expectedCells = await cellsOf(reference.farm.id);

const crashed = await makeUpload('crashed', stored);
const boss = await startQueue(url, 'app');
await boss.send(processUploadQueue, { uploadId: crashed.upload.id });
let w = worker();
const t0 = Date.now();
for (;;) {
	const [u] = await db.select().from(uploads).where(eq(uploads.id, crashed.upload.id));
	if (u.status === 'processing' && u.progress >= 0.5) break;
	if (Date.now() - t0 > 120_000) throw new Error('the job never got half way');
	await sleep(100);
}
w.kill('SIGKILL');
console.log(`restart: worker killed with the job half done (${((Date.now() - t0) / 1000).toFixed(1)} s in)`);
await sleep(500);
const t1 = Date.now();
w = worker();
let final;
for (;;) {
	[final] = await db.select().from(uploads).where(eq(uploads.id, crashed.upload.id));
	if (final.status === 'done' || final.status === 'failed') break;
	if (Date.now() - t1 > 180_000) break;
	await sleep(250);
}
w.kill('SIGTERM');
const got = await db.select().from(applications).where(eq(applications.farmId, crashed.farm.id)).orderBy(applications.day);
const gotCells = await cellsOf(crashed.farm.id);
const same =
	final?.status === 'done' &&
	expectedCells.n > 0 &&
	gotCells.n === expectedCells.n &&
	Math.abs(gotCells.covered - expectedCells.covered) <= 1e-9 * expectedCells.covered &&
	Math.abs(gotCells.volume - expectedCells.volume) <= 1e-9 * Math.max(expectedCells.volume, 1) &&
	got.length === expected.length &&
	got.every((a, i) => a.coveredM2 === expected[i].coveredM2 && a.sprayedM2 === expected[i].sprayedM2 && a.volumeL === expected[i].volumeL);
console.log(`restart: after the restart the upload is ${final?.status} in ${((Date.now() - t1) / 1000).toFixed(1)} s (attempts ${final?.attempts}); ${got.length} applications and ${gotCells.n} cell results, figures ${same ? 'equal to' : 'DIFFERENT from'} the uninterrupted run's`);
await boss.stop({ graceful: false, wait: false });
await client.end();
process.exit(same ? 0 : 1);
