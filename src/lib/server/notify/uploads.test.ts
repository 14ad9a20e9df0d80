// An upload processed by the worker's own job function, on the real database, mailed through
// the fake SMTP server: who gets what, once.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { and, eq, gt, sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { detectMapping } from '$lib/ingest/mapping';
import { db } from '$lib/server/db';
import { applications, devOutbox, fields, machines, tankMixes, uploads, users } from '$lib/server/db/schema';
import { processUploadJob } from '$lib/server/ingest/process-upload';
import * as rawStore from '$lib/server/storage/raw-store';
import { join as joinFarm, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { linksIn, waitForMail } from '$lib/server/testing/outbox';

beforeAll(() => {
	process.env.PATCHBOOK_DATA_DIR = mkdtempSync(join(tmpdir(), 'pb-notify-'));
});

/** Two straight passes 36.576 m apart, every other one of 144 nozzles open: 50 % sprayed by hand. */
function passesCsv(seed: number) {
	const lines = ['time,lat,lon,nozzles'];
	const pattern = Array.from({ length: 144 }, (_, k) => (k % 2 ? '0' : '1')).join('');
	let t = Date.parse('2026-05-04T16:00:00Z') / 1000 + seed; // the seed makes each file's bytes differ
	for (let p = 0; p < 2; p++) {
		const lat = 47.1225 + (p * 36.576) / 111_195;
		for (let i = 0; i <= 500; i++) {
			const lng = -118.318 + (p % 2 ? 1 - i / 500 : i / 500) * 0.016;
			lines.push(`${new Date(t * 1000).toISOString()},${lat.toFixed(8)},${lng.toFixed(8)},${pattern}`);
			t += 0.4;
		}
		t += 30;
	}
	return lines.join('\n') + '\n';
}

async function setUp() {
	const farm = await makeFarm();
	const operator = await makeUser();
	const manager = await makeUser();
	const quietManager = await makeUser();
	const agronomist = await makeUser();
	const otherFarmManager = await makeUser();
	await joinFarm(farm.id, operator.id, 'operator');
	await joinFarm(farm.id, manager.id, 'manager');
	await joinFarm(farm.id, quietManager.id, 'manager');
	await joinFarm(farm.id, agronomist.id, 'agronomist');
	await joinFarm((await makeFarm()).id, otherFarmManager.id, 'manager');
	await db.update(users).set({ notifyUploads: false }).where(eq(users.id, quietManager.id));
	await db.update(users).set({ units: 'us' }).where(eq(users.id, manager.id));
	const boundary = { type: 'Polygon' as const, coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]] };
	const [field] = await db.insert(fields).values({ farmId: farm.id, name: 'North', ...fieldGeometryColumns(boundary) }).returning();
	const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', boomWidthM: 36.576, nozzleCount: 144, nozzleSpacingM: 0.254 }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	return { farm, operator, manager, quietManager, agronomist, otherFarmManager, field, machine, mix };
}

async function upload(ctx: Awaited<ReturnType<typeof setUp>>, by: string, name: string, csv: string) {
	const stored = await rawStore.put(Readable.from([Buffer.from(csv)]), 1e9);
	await db.execute(sql`insert into raw_files (sha256, size_bytes) values (${stored.sha256}, ${stored.sizeBytes}) on conflict do nothing`);
	const lines = csv.split('\n');
	const mapping = detectMapping(lines[0].split(','), lines.slice(1, 6).map((l) => l.split(',')));
	const [row] = await db
		.insert(uploads)
		.values({ farmId: ctx.farm.id, uploadedBy: by, fileName: name, format: 'csv', mapping: mapping as unknown as Record<string, unknown>, machineId: ctx.machine.id, tankMixId: ctx.mix.id, status: 'queued', ...stored })
		.returning();
	return row;
}

/** Every message of this farm to this person, after `since`. */
async function mailsTo(farmId: string, email: string, since: Date) {
	return db
		.select()
		.from(devOutbox)
		.where(and(eq(devOutbox.farmId, farmId), sql`${email.toLowerCase()} = any(${devOutbox.envelopeTo})`, gt(devOutbox.receivedAt, since)));
}
/** The fake server stores a message a moment after it is taken: wait for the last expected one, then a little. */
const settle = () => new Promise((r) => setTimeout(r, 400));

describe('upload notifications', () => {
	it('a processed upload mails the uploader and each manager once, with the figures, and nobody who opted out', async () => {
		const ctx = await setUp();
		const since = new Date(Date.now() - 1000);
		const u = await upload(ctx, ctx.operator.id, 'north-passes.csv', passesCsv(1));
		await processUploadJob(db, u.id, { attemptsLeft: 0 });
		const [done] = await db.select().from(uploads).where(eq(uploads.id, u.id));
		expect(done.status).toBe('done');

		const toOperator = await waitForMail(ctx.operator.email, { since, kind: 'upload-done' });
		await waitForMail(ctx.manager.email, { since, kind: 'upload-done' });
		await settle();
		expect(await mailsTo(ctx.farm.id, ctx.operator.email, since)).toHaveLength(1);
		expect(await mailsTo(ctx.farm.id, ctx.manager.email, since)).toHaveLength(1);
		expect(await mailsTo(ctx.farm.id, ctx.quietManager.email, since)).toHaveLength(0);
		expect(await mailsTo(ctx.farm.id, ctx.agronomist.email, since)).toHaveLength(0);
		expect(await db.select().from(devOutbox).where(and(sql`${ctx.otherFarmManager.email} = any(${devOutbox.envelopeTo})`, gt(devOutbox.receivedAt, since)))).toHaveLength(0);

		expect(toOperator.subject).toBe('Processed: north-passes.csv');
		expect(toOperator.farmId).toBe(ctx.farm.id);
		// The figures are the application's own, in each reader's units; half the nozzles open: 50 %.
		const [app] = await db.select().from(applications).where(eq(applications.fieldId, ctx.field.id));
		const ha = app.coveredM2 / 1e4;
		expect(toOperator.textBody).toContain(`North on 2026-05-04: ${ha.toPrecision(4).replace(/\.?0+$/, '')} ha covered`);
		expect(toOperator.textBody).toMatch(/\(50 % of the area covered\)/);
		expect(toOperator.textBody).toContain('because you uploaded the log');
		expect(linksIn(toOperator.textBody)).toContain(`http://127.0.0.1:4173/${ctx.farm.slug}/uploads/${u.id}`);
		const toManager = (await mailsTo(ctx.farm.id, ctx.manager.email, since))[0];
		// US units for this manager: 1 ac = 4,046.8564224 m2 (NIST SP 811).
		const ac = app.coveredM2 / 4046.8564224;
		expect(toManager.textBody).toContain(`${ac.toPrecision(4).replace(/\.?0+$/, '')} ac covered`);
		expect(toManager.textBody).toContain(`because you manage ${ctx.farm.name}`);
	});

	it('an uploader who is also a manager gets one mail, not two', async () => {
		const ctx = await setUp();
		const since = new Date(Date.now() - 1000);
		const u = await upload(ctx, ctx.manager.id, 'by-manager.csv', passesCsv(2));
		await processUploadJob(db, u.id, { attemptsLeft: 0 });
		await waitForMail(ctx.manager.email, { since, kind: 'upload-done' });
		await settle();
		const mails = await mailsTo(ctx.farm.id, ctx.manager.email, since);
		expect(mails).toHaveLength(1);
		expect(mails[0].textBody).toContain('because you uploaded the log');
	});

	it('a failing upload sends the failure sentence', async () => {
		const ctx = await setUp();
		const since = new Date(Date.now() - 1000);
		const lines = passesCsv(3).split('\n');
		lines[10] = lines[10].replace(/,-118\.\d+,/, ',west,');
		const u = await upload(ctx, ctx.operator.id, 'broken.csv', lines.join('\n'));
		await processUploadJob(db, u.id, { attemptsLeft: 3 });
		const [failed] = await db.select().from(uploads).where(eq(uploads.id, u.id));
		expect(failed.status).toBe('failed');
		const mail = await waitForMail(ctx.operator.email, { since, kind: 'upload-failed' });
		expect(mail.subject).toBe('Could not process: broken.csv');
		expect(mail.textBody).toContain(failed.error!);
		expect(failed.error).toContain('broken.csv, row 11');
		await waitForMail(ctx.manager.email, { since, kind: 'upload-failed' });
	});

	it('notify: false sends nothing; a job going back to the queue sends nothing until it ends failed', async () => {
		const ctx = await setUp();
		const since = new Date(Date.now() - 1000);
		const u = await upload(ctx, ctx.operator.id, 'quiet.csv', passesCsv(4));
		await processUploadJob(db, u.id, { attemptsLeft: 0, notify: false });
		expect((await db.select().from(uploads).where(eq(uploads.id, u.id)))[0].status).toBe('done');
		// Our side breaks (a tank mix rate that is not a number, which the coverage engine refuses
		// as a programming error, not the file's fault): with tries left the job throws for
		// pg-boss to retry and nobody is mailed; the last try ends failed and mails.
		await db.update(tankMixes).set({ carrierRateLPerM2: sql`'NaN'::float8` }).where(eq(tankMixes.id, ctx.mix.id));
		await expect(processUploadJob(db, u.id, { attemptsLeft: 2 })).rejects.toThrow(/defaultRateLPerM2/);
		expect((await db.select().from(uploads).where(eq(uploads.id, u.id)))[0].status).toBe('queued');
		await settle();
		expect(await mailsTo(ctx.farm.id, ctx.operator.email, since)).toHaveLength(0);
		await processUploadJob(db, u.id, { attemptsLeft: 0 });
		const mail = await waitForMail(ctx.operator.email, { since, kind: 'upload-failed' });
		expect(mail.textBody).toMatch(/Processing failed on our side \(reference [a-z0-9]+\)/);
		await settle();
		expect((await mailsTo(ctx.farm.id, ctx.operator.email, since)).map((m) => m.kind)).toEqual(['upload-failed']);
	});

	it('a mail server that is down never fails the job', async () => {
		const ctx = await setUp();
		const saved = process.env.SMTP_URL;
		process.env.SMTP_URL = 'smtp://127.0.0.1:9'; // discard port: nothing listens
		try {
			const u = await upload(ctx, ctx.operator.id, 'no-mail.csv', passesCsv(5));
			await expect(processUploadJob(db, u.id, { attemptsLeft: 3 })).resolves.toBeUndefined();
			expect((await db.select().from(uploads).where(eq(uploads.id, u.id)))[0].status).toBe('done');
		} finally {
			process.env.SMTP_URL = saved;
		}
	});
});
