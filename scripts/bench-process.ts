// The end-to-end part of npm run bench, in its own process so its peak RSS is its own: store the
// log, make a farm, field, machine and tank mix, and run the worker's processing on it.
import { createReadStream } from 'node:fs';
import { sql } from 'drizzle-orm';
import type { Polygon } from 'geojson';
import { fieldGeometryColumns } from '../src/lib/geo/field-geometry';
import { readLog } from '../src/lib/ingest/log';
import { detectMapping } from '../src/lib/ingest/mapping';
import { createDb } from '../src/lib/server/db/create';
import { farms, fields, machines, rawFiles, tankMixes, uploads } from '../src/lib/server/db/schema';
import { processUpload } from '../src/lib/server/ingest/process-upload';
import * as rawStore from '../src/lib/server/storage/raw-store';

const [csvPath, fieldJson, boomJson] = process.argv.slice(2);
const field = JSON.parse(fieldJson) as Polygon;
const boom = JSON.parse(boomJson) as { boomWidthM: number; nozzleCount: number; nozzleSpacingM: number };
const { db, client } = createDb(process.env.DATABASE_URL!, { max: 4 });

const stored = await rawStore.put(createReadStream(csvPath), 2e9);
const [farm] = await db.insert(farms).values({ slug: `bench-${Date.now()}`, name: 'Bench farm' }).returning();
await db.insert(fields).values({ farmId: farm.id, name: 'Bench field', ...fieldGeometryColumns(field) });
const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Bench boom', ...boom }).returning();
const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Bench mix', carrierRateLPerM2: 0.01 }).returning();
await db.insert(rawFiles).values(stored).onConflictDoNothing();
const header = 'time,lat,lon,speed_kmh,rate_lha,nozzles'.split(',');
const mapping = detectMapping(header, []);
const [upload] = await db
	.insert(uploads)
	.values({ farmId: farm.id, fileName: 'bench-log.csv', format: 'csv', ...stored, mapping: mapping as unknown as Record<string, unknown>, machineId: machine.id, tankMixId: mix.id, status: 'queued' })
	.returning();

// Reading alone first (its time is reported apart), then the whole job as the worker does it.
const r0 = performance.now();
const read = await readLog('bench-log.csv', rawStore.read(stored.sha256), mapping, { nozzleCount: boom.nozzleCount });
const readMs = performance.now() - r0;
if (!read.fixes) throw new Error(JSON.stringify(read.errors.slice(0, 3)));
read.fixes = null;

const t0 = performance.now();
const marks: [number, number][] = [];
await processUpload(db, upload.id, async (fraction) => {
	marks.push([fraction, performance.now() - t0]);
});
const processMs = performance.now() - t0;
// Progress marks: 0.35 after reading, 0.5 after cleaning and splitting, then per application.
const at = (f: number) => marks.find(([x]) => x >= f)?.[1] ?? NaN;
console.log(`bench: read ${(at(0.35) / 1000).toFixed(1)} s, clean+split ${((at(0.5) - at(0.35)) / 1000).toFixed(1)} s, pack+recompute+write ${((processMs - at(0.5)) / 1000).toFixed(1)} s`);
const [totals] = await db.execute<{ covered: number; sprayed: number; cells: number }>(
	sql`select sum(covered_m_2)::float8 as covered, sum(sprayed_m_2)::float8 as sprayed,
	(select count(*) from cell_results c join applications a on a.id = c.application_id where a.farm_id = ${farm.id})::int as cells
	from applications where farm_id = ${farm.id}`
);
await client.end();
const result = { readMs, processMs, maxRssMB: process.resourceUsage().maxRSS / 1024, coveredM2: totals.covered, sprayedM2: totals.sprayed, cells: totals.cells };
if (process.send) process.send(result);
else console.log(result);
