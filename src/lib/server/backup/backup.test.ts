// Backup and restore round trip on the real cluster: a farm with a processed upload is backed up,
// restored into a fresh database and a fresh data dir, and its figures and raw bytes compared.
// The restored database is read through a second copy of the app's modules (vi.resetModules with
// DATABASE_URL pointing at it), so the savings rows come from the same code the app runs.
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, expect, test, vi } from 'vitest';
import { detectMapping } from '$lib/ingest/mapping';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { db } from '$lib/server/db';
import { fields, machines, products, tankMixes, tankMixProducts, uploads } from '$lib/server/db/schema';
import { processUpload } from '$lib/server/ingest/process-upload';
import * as rawStore from '$lib/server/storage/raw-store';
import { join as joinFarm, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import type { Actor } from '$lib/server/auth/guard';
import { backup, restore, verify } from './backup';

const restoredName = `${process.env.VITEST_DB ?? 'patchbook_vitest'}_restored`;
const originalUrl = process.env.DATABASE_URL!;
const root = mkdtempSync(join(tmpdir(), 'pb-backup-'));
const originalData = join(root, 'data');
const restoredData = join(root, 'restored-data');

/** Passes 36.576 m apart at 5 Hz with every other nozzle open, in the field below. */
function logCsv(): string {
	const lines = ['time,lat,lon,nozzles'];
	const pattern = Array.from({ length: 144 }, (_, k) => (k % 2 ? '0' : '1')).join('');
	let t = Date.parse('2026-05-04T16:00:00Z') / 1000;
	for (let p = 0; p < 4; p++) {
		const lat = 47.1225 + (p * 36.576) / 111_195;
		for (let i = 0; i <= 400; i++) {
			const f = i / 400;
			const lng = p % 2 ? -118.302 - f * 0.016 : -118.318 + f * 0.016;
			lines.push(`${new Date(t * 1000).toISOString()},${lat.toFixed(8)},${lng.toFixed(8)},${pattern}`);
			t += 0.2;
		}
		t += 30;
	}
	return lines.join('\n') + '\n';
}

let actor: Actor;
let sha256: string;

beforeAll(async () => {
	process.env.PATCHBOOK_DATA_DIR = originalData;
	const farm = await makeFarm();
	const user = await makeUser();
	await joinFarm(farm.id, user.id, 'manager');
	actor = { user, farm: { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency }, role: 'manager' };
	const boundary = { type: 'Polygon' as const, coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]] };
	await db.insert(fields).values({ farmId: farm.id, name: 'North', ...fieldGeometryColumns(boundary) });
	const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', boomWidthM: 36.576, nozzleCount: 144, nozzleSpacingM: 0.254 }).returning();
	const [product] = await db.insert(products).values({ farmId: farm.id, name: 'Product A', unit: 'L', pricePerUnit: 12.5 }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	await db.insert(tankMixProducts).values({ tankMixId: mix.id, productId: product.id, ratePerM2: 0.0002 });
	const csv = logCsv();
	const stored = await rawStore.put(Readable.from([Buffer.from(csv)]), 1e9);
	sha256 = stored.sha256;
	await db.execute(sql`insert into raw_files (sha256, size_bytes) values (${stored.sha256}, ${stored.sizeBytes}) on conflict do nothing`);
	const header = csv.split('\n')[0].split(',');
	const [u] = await db
		.insert(uploads)
		.values({ farmId: farm.id, uploadedBy: user.id, fileName: 'log.csv', format: 'csv', mapping: detectMapping(header, []) as never, machineId: machine.id, tankMixId: mix.id, status: 'queued', ...stored })
		.returning();
	await processUpload(db, u.id, async () => {});
});

afterAll(() => {
	execFileSync('bash', ['scripts/db.sh', 'recreate', restoredName]);
});

/** The figures of the farm as the app's own modules read them from `url`. */
async function figuresAt(url: string) {
	vi.resetModules();
	process.env.DATABASE_URL = url;
	try {
		const dbModule = await import('$lib/server/db');
		const savings = await import('$lib/server/savings');
		const { applications: a, cellResults: c } = await import('$lib/server/db/schema');
		const { asc, eq, sql: q } = await import('drizzle-orm');
		const apps = await dbModule.db
			.select({ day: a.day, fieldId: a.fieldId, coveredM2: a.coveredM2, sprayedM2: a.sprayedM2, volumeL: a.volumeL })
			.from(a)
			.where(eq(a.farmId, actor.farm.id))
			.orderBy(asc(a.day), asc(a.fieldId));
		const cells = await dbModule.db
			.select({ n: q<number>`count(*)::int`, covered: q<number>`sum(${c.coveredM2})`, sprayed: q<number>`sum(${c.sprayedM2})`, volume: q<number>`sum(${c.volumeL})` })
			.from(c)
			.innerJoin(a, eq(a.id, c.applicationId))
			.where(eq(a.farmId, actor.farm.id));
		const rows = await savings.allRows(actor);
		// Which database these modules really read: the comparison means nothing otherwise.
		const [{ database }] = await dbModule.client`select current_database() as database`;
		await dbModule.client.end();
		return { database: database as string, figures: { apps, cells, savings: rows } };
	} finally {
		process.env.DATABASE_URL = originalUrl;
		vi.resetModules();
	}
}

test('a backup restored into a fresh database and data dir has the same figures, savings and raw bytes', async () => {
	const before = await figuresAt(originalUrl);
	expect(before.database).toBe(new URL(originalUrl).pathname.slice(1));
	expect(before.figures.apps.length).toBeGreaterThan(0);
	expect(Number(before.figures.cells[0].n)).toBeGreaterThan(0);
	expect(before.figures.savings.length).toBeGreaterThan(0);
	expect(before.figures.savings.some((r) => JSON.stringify(r).includes('Product A'))).toBe(true);

	const { path, manifest } = await backup({ databaseUrl: originalUrl, dataDir: originalData, outDir: join(root, 'backups') });
	expect(manifest.files.map((f) => f.sha256)).toContain(sha256);

	const restored = await restore({ path, databaseName: restoredName, dataDir: restoredData, replace: true });
	const after = await figuresAt(restored.databaseUrl);
	expect(after.database).toBe(restoredName);
	expect(after.figures).toEqual(before.figures);

	// The raw upload comes back byte for byte.
	const bytes = (dir: string) => createHash('sha256').update(readFileSync(join(dir, 'raw', sha256.slice(0, 2), sha256))).digest('hex');
	expect(bytes(restoredData)).toBe(sha256);
	expect(bytes(restoredData)).toBe(bytes(originalData));
});

test('restore refuses a database that is not empty, and a damaged backup, before changing anything', async () => {
	const { path } = await backup({ databaseUrl: originalUrl, dataDir: originalData, outDir: join(root, 'backups2') });
	await restore({ path, databaseName: restoredName, dataDir: join(root, 'x'), replace: true });
	// Now it holds a restore: not empty, so a second restore without --replace is refused.
	await expect(restore({ path, databaseName: restoredName, dataDir: join(root, 'x') })).rejects.toThrow(/is not empty/);
	execFileSync('bash', ['-c', `printf x >> "${join(path, 'database.dump')}"`]);
	await expect(verify(path)).rejects.toThrow(/database\.dump is damaged/);
});
