import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { eq, sql } from 'drizzle-orm';
import { beforeAll, expect, test } from 'vitest';
import { detectMapping } from '$lib/ingest/mapping';
import { db } from '$lib/server/db';
import { applicationFixes, applicationQuality, applications, cellResults, fields, machines, tankMixes, uploads } from '$lib/server/db/schema';
import { join as joinFarm, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import * as rawStore from '$lib/server/storage/raw-store';
import { processUpload, processUploadJob, UploadProblem } from './process-upload';

beforeAll(() => {
	process.env.PATCHBOOK_DATA_DIR = mkdtempSync(join(tmpdir(), 'pb-raw-'));
});

const mPerDegLat = 111_195;
const westLng = -118.318;
const eastLng = -118.302;

/** Straight passes 36.576 m apart at 5 Hz, every other nozzle open (hand-checkable: 50 %). */
function passesCsv(passes: number, startIso = '2026-05-04T16:00:00Z') {
	const lines = ['time,lat,lon,nozzles'];
	const pattern = Array.from({ length: 144 }, (_, k) => (k % 2 ? '0' : '1')).join('');
	let t = Date.parse(startIso) / 1000;
	const steps = 1000; // 1.2 m per 0.2 s: 22 km/h
	for (let p = 0; p < passes; p++) {
		const lat = 47.1225 + (p * 36.576) / mPerDegLat;
		for (let i = 0; i <= steps; i++) {
			const f = i / steps;
			const lng = p % 2 ? eastLng - f * (eastLng - westLng) : westLng + f * (eastLng - westLng);
			lines.push(`${new Date(t * 1000).toISOString()},${lat.toFixed(8)},${lng.toFixed(8)},${pattern}`);
			t += 0.2;
		}
		t += 30;
	}
	return lines.join('\n') + '\n';
}

async function setUp() {
	const farm = await makeFarm();
	const user = await makeUser();
	await joinFarm(farm.id, user.id, 'manager');
	const boundary = {
		type: 'Polygon' as const,
		coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]]
	};
	const [field] = await db.insert(fields).values({ farmId: farm.id, name: 'North', ...fieldGeometryColumns(boundary) }).returning();
	const [machine] = await db
		.insert(machines)
		.values({ farmId: farm.id, name: 'Boom', boomWidthM: 36.576, nozzleCount: 144, nozzleSpacingM: 0.254 })
		.returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	return { farm, user, field, machine, mix };
}

async function upload(ctx: Awaited<ReturnType<typeof setUp>>, name: string, csv: string) {
	const stored = await rawStore.put(Readable.from([Buffer.from(csv)]), 1e9);
	await db.execute(sql`insert into raw_files (sha256, size_bytes) values (${stored.sha256}, ${stored.sizeBytes}) on conflict do nothing`);
	const lines = csv.split('\n');
	const mapping = detectMapping(lines[0].split(','), lines.slice(1, 6).map((l) => l.split(',')));
	const [row] = await db
		.insert(uploads)
		.values({
			farmId: ctx.farm.id,
			uploadedBy: ctx.user.id,
			fileName: name,
			format: 'csv',
			mapping: mapping as unknown as Record<string, unknown>,
			machineId: ctx.machine.id,
			tankMixId: ctx.mix.id,
			status: 'queued',
			...stored
		})
		.returning();
	return row;
}

const noProgress = async () => {};

test('a log becomes one application with per-cell results that add up to it', async () => {
	const ctx = await setUp();
	const u = await upload(ctx, 'two-passes.csv', passesCsv(2));
	await processUpload(db, u.id, noProgress);

	const apps = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	expect(apps).toHaveLength(1);
	const [app] = apps;
	expect(app.day).toBe('2026-05-04'); // the demo farm's zone is UTC here (farms.timeZone default)
	expect(app.season).toBe(2026);
	// Hand check: two passes of the same length that just touch; half the nozzles open.
	expect(app.sprayedM2 / app.coveredM2).toBeCloseTo(0.5, 2);
	// Volume at the carrier rate on the sprayed bands (0.01 L/m2 = 100 L/ha).
	expect(app.volumeL).toBeCloseTo(app.sprayedM2 * 0.01, 0);

	const [sums] = await db
		.select({ covered: sql<number>`sum(${cellResults.coveredM2})`, sprayed: sql<number>`sum(${cellResults.sprayedM2})`, volume: sql<number>`sum(${cellResults.volumeL})` })
		.from(cellResults)
		.where(eq(cellResults.applicationId, app.id));
	expect(Number(sums.covered)).toBeCloseTo(app.coveredM2, 0);
	expect(Number(sums.sprayed)).toBeCloseTo(app.sprayedM2, 0);
	expect(Number(sums.volume)).toBeCloseTo(app.volumeL, 1);

	const [done] = await db.select().from(uploads).where(eq(uploads.id, u.id));
	expect(done.status).toBe('done');
	expect(done.fixesTotal).toBe(2002);
	expect(done.fixesOutside).toBe(0);
});

test('processing again gives the same figures; nothing is counted twice', async () => {
	const ctx = await setUp();
	const u = await upload(ctx, 'again.csv', passesCsv(2));
	await processUpload(db, u.id, noProgress);
	const [first] = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	await processUpload(db, u.id, noProgress);
	const again = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	expect(again).toHaveLength(1);
	expect(again[0].coveredM2).toBeCloseTo(first.coveredM2, 6);
	expect(again[0].volumeL).toBeCloseTo(first.volumeL, 6);
	const parts = await db.select().from(applicationFixes).where(eq(applicationFixes.applicationId, first.id));
	expect(parts).toHaveLength(1);
});

test('two logs of one field and day make one application whose covered area is their union', async () => {
	const ctx = await setUp();
	const a = await upload(ctx, 'morning.csv', passesCsv(1, '2026-05-04T15:00:00Z'));
	const b = await upload(ctx, 'afternoon.csv', passesCsv(1, '2026-05-04T18:00:00Z')); // the same ground again
	await processUpload(db, a.id, noProgress);
	const [one] = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	await processUpload(db, b.id, noProgress);
	const both = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	expect(both).toHaveLength(1);
	// Overlaps count once in area, twice in volume (DESIGN.md, the footprint model).
	expect(both[0].coveredM2).toBeCloseTo(one.coveredM2, 0);
	expect(both[0].volumeL).toBeCloseTo(2 * one.volumeL, 0);
	expect(both[0].fixCount).toBe(2 * one.fixCount);
});

test('a bad file fails with the row and column named, and leaves no figures behind', async () => {
	const ctx = await setUp();
	const lines = passesCsv(1).split('\n');
	lines[10] = lines[10].replace(/,-118\.\d+,/, ',west,');
	const u = await upload(ctx, 'broken.csv', lines.join('\n'));
	await expect(processUpload(db, u.id, noProgress)).rejects.toThrow(UploadProblem);
	await processUploadJob(db, u.id, { attemptsLeft: 3 });
	const [failed] = await db.select().from(uploads).where(eq(uploads.id, u.id));
	expect(failed.status).toBe('failed');
	expect(failed.error).toContain('broken.csv, row 11');
	expect(failed.error).toContain("column 'lon'");
	expect(await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id))).toHaveLength(0);
	// The raw upload is kept, to be processed again once the mapping or file is fixed.
	expect(await rawStore.exists(u.sha256)).toBe(true);
});

test('fixes outside every field are counted, not silently dropped', async () => {
	const ctx = await setUp();
	const csv = passesCsv(1).replaceAll('47.12250000', '47.50000000'); // 40 km north of the field
	const u = await upload(ctx, 'elsewhere.csv', csv);
	await processUpload(db, u.id, noProgress);
	const [done] = await db.select().from(uploads).where(eq(uploads.id, u.id));
	expect(done.fixesOutside).toBe(1001);
	expect(done.fixesUsed).toBe(0);
});

test('application quality: speed, pressure and boom height against the machine limits, the turn as a gap; a re-process uses new limits', async () => {
	const ctx = await setUp();
	await db
		.update(machines)
		.set({ maxSpeedMPerS: 20 / 3.6, targetHeightM: 0.5, heightToleranceM: 0.1, pressureMinPa: 2e5, pressureMaxPa: 4e5 })
		.where(eq(machines.id, ctx.machine.id));
	// Pass 1 at 18 km/h, 3 bar, 50 cm: fine. Pass 2 at 24 km/h, 1.5 bar, 80 cm: all three out.
	const lines = passesCsv(2).trimEnd().split('\n');
	const csv =
		[
			`${lines[0]},Speed [km/h],Pressure [bar],Boom height [cm]`,
			...lines.slice(1).map((line, i) => (i < 1001 ? `${line},18,3,50` : `${line},24,1.5,80`))
		].join('\n') + '\n';
	const u = await upload(ctx, 'quality.csv', csv);
	await processUpload(db, u.id, noProgress);
	const [app] = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	const [q] = await db.select().from(applicationQuality).where(eq(applicationQuality.applicationId, app.id));
	const s = q.summary;
	// Two passes of 0.016° of longitude at about 47.12° N (mean sphere, as cleaning measures).
	const passM = (eastLng - westLng) * 111_195.08 * Math.cos((47.1225 * Math.PI) / 180);
	expect(s.sprayingDistanceM).toBeCloseTo(2 * passM, -1);
	for (const check of [s.speed, s.pressure, s.height]) {
		expect(check.status).toBe('checked');
		if (check.status === 'checked') expect(check.sharePercent).toBeCloseTo(50, 0);
	}
	expect(s.speed.source).toBe('logged');
	if (s.height.status === 'checked') expect(s.height.max).toBeCloseTo(0.8, 6);
	// The 30 s turn between the passes, inside the field with no master column: one gap.
	expect(s.gaps.count).toBe(1);
	expect(s.gaps.seconds).toBeCloseTo(30.2, 1);
	// The second pass is one flagged stretch (speed + height + pressure = 7), simplified to its ends.
	const flagged = q.segments.filter((r) => r.f === 7);
	expect(flagged).toHaveLength(1);
	expect(flagged[0].c.length).toBeLessThanOrEqual(3);

	// Limits changed in the catalogue reach the figures when the upload is processed again.
	await db.update(machines).set({ maxSpeedMPerS: 30 / 3.6, pressureMinPa: null, pressureMaxPa: null }).where(eq(machines.id, ctx.machine.id));
	await processUpload(db, u.id, noProgress);
	const [again] = await db.select().from(applicationQuality).where(eq(applicationQuality.applicationId, app.id));
	expect(again.summary.speed).toMatchObject({ status: 'checked', flaggedM: 0 });
	expect(again.summary.pressure).toMatchObject({ status: 'no-limit', min: 1.5e5, max: 3e5 });
});

test('a log without speed, pressure or height columns is checked from positions and says what it lacks', async () => {
	const ctx = await setUp();
	const u = await upload(ctx, 'bare.csv', passesCsv(1));
	await processUpload(db, u.id, noProgress);
	const [app] = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
	const [q] = await db.select().from(applicationQuality).where(eq(applicationQuality.applicationId, app.id));
	// The machine sets no limits: the speed range seen (about 21.6 km/h from positions) is kept.
	expect(q.summary.speed).toMatchObject({ status: 'no-limit', source: 'positions' });
	if (q.summary.speed.status === 'no-limit') expect(q.summary.speed.max! * 3.6).toBeCloseTo(21.6, 0);
	expect(q.summary.height).toEqual({ status: 'not-logged' });
	expect(q.summary.pressure).toEqual({ status: 'not-logged' });
	expect(q.segments).toEqual([]);
});
