// Upload limits on the real upload paths: the field-boundary and zone import actions, the note
// form, the as-applied log API and its processing. Each refusal is a sentence, happens before
// the body is held whole, and leaves nothing stored.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { eq, sql } from 'drizzle-orm';
import { zipSync } from 'fflate';
import { beforeAll, describe, expect, test, vi } from 'vitest';
import { db } from '$lib/server/db';
import { fields, machines, rawFiles, tankMixes, uploads, zones } from '$lib/server/db/schema';
import { eventFor, join as joinFarm, makeFarm, makeField, makeUser } from '$lib/server/testing/fixtures';
import * as rawStore from '$lib/server/storage/raw-store';
import { processUpload, UploadProblem } from '$lib/server/ingest/process-upload';
import * as notes from '$lib/server/notes';
import { BOUNDARY_FILE_MAX_BYTES, FORM_OVERHEAD_BYTES } from './upload-limits';
import { actions as fieldImport } from '../../routes/(app)/[farm]/fields/import/+page.server';
import { actions as zoneImport } from '../../routes/(app)/[farm]/fields/[id=uuid]/zones/import/+page.server';
import { POST as uploadLog } from '../../routes/api/farms/[farm]/uploads/+server';

// The log API reads UPLOAD_MAX_BYTES through $env/dynamic/private; 1 MB here keeps the test quick.
vi.mock('$env/dynamic/private', async (original) => {
	const m = (await original()) as { env: Record<string, string> };
	return { env: { ...m.env, UPLOAD_MAX_BYTES: String(1024 * 1024) } };
});

beforeAll(() => {
	process.env.PATCHBOOK_DATA_DIR = mkdtempSync(join(tmpdir(), 'pb-limits-'));
});

type Failure = { status: number; data: { message: string } };
type Action = (e: never) => Promise<unknown>;

async function manager() {
	const farm = await makeFarm();
	const user = await makeUser();
	await joinFarm(farm.id, user.id, 'manager');
	return { farm, user };
}

const square = { type: 'Polygon', coordinates: [[[-98.52, 38.51], [-98.51, 38.51], [-98.51, 38.518], [-98.52, 38.518], [-98.52, 38.51]]] };
const geojson = (name: string) => new File([JSON.stringify({ type: 'FeatureCollection', features: [{ type: 'Feature', properties: { name }, geometry: square }] })], `${name}.geojson`);

function formRequest(form: FormData): Request {
	return new Request('http://127.0.0.1/x', { method: 'POST', body: form });
}

/** A body that would be `total` bytes, made as it is read, counting what the server pulled. */
function hugeBody(total: number) {
	const chunk = new Uint8Array(64 * 1024).fill(0x61);
	const counter = { pulled: 0, cancelled: false };
	const stream = new ReadableStream<Uint8Array>({
		pull(controller) {
			if (counter.pulled >= total) return controller.close();
			counter.pulled += chunk.length;
			controller.enqueue(chunk);
		},
		cancel() {
			counter.cancelled = true;
		}
	});
	return { stream, counter };
}

async function call(action: Action, user: Awaited<ReturnType<typeof makeUser>>, params: Record<string, string>, request: Request) {
	const event = { ...eventFor(user, params), request };
	return (await action(event as never)) as Failure;
}

/** A zip of 64 MB of zeros (about 64 kB compressed): a small zip bomb. */
function zipBomb(inner = 'fields.shp') {
	return zipSync({ [inner]: new Uint8Array(64 * 1024 * 1024), 'fields.dbf': new Uint8Array(10) }, { level: 9 });
}

const fieldCount = async (farmId: string) => (await db.select({ n: sql<number>`count(*)::int` }).from(fields).where(eq(fields.farmId, farmId)))[0].n;

describe('boundary import limits', () => {
	test('a declared length over the limit is refused with a sentence before reading', async () => {
		const { farm, user } = await manager();
		const { stream, counter } = hugeBody(400 * 1024 * 1024);
		const request = new Request('http://127.0.0.1/x', { method: 'POST', body: stream, duplex: 'half', headers: { 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(400 * 1024 * 1024) } } as RequestInit);
		const r = await call(fieldImport.preview as Action, user, { farm: farm.slug }, request);
		expect(r.status).toBe(413);
		expect(r.data.message).toBe('The upload is too large: a boundary file may be at most 25 MB.');
		expect(counter.pulled).toBeLessThanOrEqual(64 * 1024 * 2); // at most what the stream buffered ahead
	});

	test('a body with no declared length stops being read at the limit', async () => {
		const { farm, user } = await manager();
		const { stream, counter } = hugeBody(400 * 1024 * 1024);
		const request = new Request('http://127.0.0.1/x', { method: 'POST', body: stream, duplex: 'half', headers: { 'content-type': 'multipart/form-data; boundary=x' } } as RequestInit);
		const r = await call(fieldImport.save as Action, user, { farm: farm.slug }, request);
		expect(r.status).toBe(413);
		expect(r.data.message).toMatch(/^The upload is too large/);
		const limit = BOUNDARY_FILE_MAX_BYTES + FORM_OVERHEAD_BYTES;
		expect(counter.pulled).toBeGreaterThan(limit);
		expect(counter.pulled).toBeLessThan(limit + 4 * 64 * 1024);
		expect(counter.cancelled).toBe(true);
		expect(await fieldCount(farm.id)).toBe(0);
	});

	test('two files in one import are refused and nothing is saved', async () => {
		const { farm, user } = await manager();
		const form = new FormData();
		form.append('file', geojson('Invented East'));
		form.append('file', geojson('Invented West'));
		form.append('pick', '1');
		const r = await call(fieldImport.save as Action, user, { farm: farm.slug }, formRequest(form));
		expect(r.status).toBe(400);
		expect(r.data.message).toBe('2 files were sent; a boundary file takes one file at a time.');
		expect(await fieldCount(farm.id)).toBe(0);
		// The same form with one file saves: the limit, not the form, refused it.
		const one = new FormData();
		one.append('file', geojson('Invented East'));
		one.append('pick', '1');
		one.append('name-1', 'Invented East');
		await expect(call(fieldImport.save as Action, user, { farm: farm.slug }, formRequest(one))).rejects.toMatchObject({ status: 303 });
		expect(await fieldCount(farm.id)).toBe(1);
	});

	test('a zip bomb is refused with a sentence and no field is saved', async () => {
		const { farm, user } = await manager();
		const form = new FormData();
		form.append('file', new File([zipBomb()], 'fields.zip'));
		form.append('pick', '1');
		const r = await call(fieldImport.save as Action, user, { farm: farm.slug }, formRequest(form));
		expect(r.status).toBe(400);
		expect(r.data.message).toMatch(/^fields\.zip: zip entry 'fields\.shp' expands \d+ times \(over 100x\); refused as a possible zip bomb$/);
		expect(await fieldCount(farm.id)).toBe(0);
	});

	test('a zip with more than 1000 entries is refused', async () => {
		const { farm, user } = await manager();
		const entries: Record<string, Uint8Array> = {};
		for (let i = 0; i < 1001; i++) entries[`part-${i}.txt`] = new Uint8Array([i & 0xff]);
		const form = new FormData();
		form.append('file', new File([zipSync(entries)], 'many.zip'));
		const r = await call(fieldImport.preview as Action, user, { farm: farm.slug }, formRequest(form));
		expect(r.data.message).toBe('many.zip: holds 1001 entries; at most 1000 are accepted');
	});
});

describe('zone import limits', () => {
	test('over-size, two files and a zip bomb are refused; no zone is stored', async () => {
		const { farm, user } = await manager();
		const field = await makeField(farm.id, 'Invented North');
		const params = { farm: farm.slug, id: field.id };
		const zoneCount = async () => (await db.select({ n: sql<number>`count(*)::int` }).from(zones).where(eq(zones.fieldId, field.id)))[0].n;

		const { stream } = hugeBody(100 * 1024 * 1024);
		const big = new Request('http://127.0.0.1/x', { method: 'POST', body: stream, duplex: 'half', headers: { 'content-type': 'multipart/form-data; boundary=x' } } as RequestInit);
		expect((await call(zoneImport.save as Action, user, params, big)).data.message).toBe('The upload is too large: a zone file may be at most 25 MB.');

		const two = new FormData();
		two.append('file', geojson('a'));
		two.append('other', geojson('b'));
		expect((await call(zoneImport.save as Action, user, params, formRequest(two))).data.message).toBe('2 files were sent; a zone file takes one file at a time.');

		const bomb = new FormData();
		bomb.append('file', new File([zipBomb()], 'zones.zip'));
		bomb.append('pick', '1');
		expect((await call(zoneImport.save as Action, user, params, formRequest(bomb))).data.message).toMatch(/^zones\.zip: zip entry 'fields\.shp' expands \d+ times/);
		expect(await zoneCount()).toBe(0);
	});
});

describe('note photo limits', () => {
	test('two photos in one note are refused', async () => {
		const form = new FormData();
		form.append('body', 'Invented patch of kochia');
		form.append('photo', new File([new Uint8Array([0xff, 0xd8, 0xff])], 'a.jpg'));
		form.append('photo', new File([new Uint8Array([0xff, 0xd8, 0xff])], 'b.jpg'));
		expect(await notes.readNoteForm(formRequest(form))).toEqual({ tooLarge: '2 files were sent; a note takes one file at a time. Attach one photo.' });
	});
});

describe('as-applied log limits', () => {
	test('the API refuses a log over UPLOAD_MAX_BYTES, declared or streamed, and stores nothing', async () => {
		const { farm, user } = await manager();
		{
			const uploadsOf = async () => (await db.select({ n: sql<number>`count(*)::int` }).from(uploads).where(eq(uploads.farmId, farm.id)))[0].n;
			const post = async (headers: Record<string, string>) => {
				const { stream, counter } = hugeBody(50 * 1024 * 1024);
				const request = new Request('http://127.0.0.1/x', { method: 'POST', body: stream, duplex: 'half', headers } as RequestInit);
				const event = { ...eventFor(user, { farm: farm.slug }, `/api/farms/${farm.slug}/uploads?name=big.csv`), request };
				try {
					await uploadLog(event as never);
				} catch (e) {
					return { e: e as { status: number; body: { message: string } }, counter };
				}
				throw new Error('expected a refusal');
			};
			const declared = await post({ 'content-length': String(50 * 1024 * 1024) });
			expect(declared.e.status).toBe(413);
			expect(declared.e.body.message).toBe('big.csv is larger than the limit of 1 MB.');
			expect(declared.counter.pulled).toBeLessThanOrEqual(2 * 64 * 1024);
			const streamed = await post({});
			expect(streamed.e.status).toBe(413);
			expect(streamed.e.body.message).toBe('big.csv: The file is larger than the limit of 1 MB.');
			expect(streamed.counter.pulled).toBeLessThan(1024 * 1024 + 4 * 64 * 1024);
			expect(await uploadsOf()).toBe(0);
		}
	});

	test('a zipped log that is a zip bomb fails processing with a sentence; no fixes are stored', async () => {
		const { farm, user } = await manager();
		await makeField(farm.id, 'Invented North');
		const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', boomWidthM: 36, nozzleCount: 8, nozzleSpacingM: 4.5 }).returning();
		const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
		const stored = await rawStore.put(Readable.from([Buffer.from(zipBomb('log.shp'))]), 1e9);
		await db.insert(rawFiles).values(stored).onConflictDoNothing();
		const [u] = await db
			.insert(uploads)
			.values({ farmId: farm.id, uploadedBy: user.id, fileName: 'log.zip', format: 'shapefile', status: 'queued', machineId: machine.id, tankMixId: mix.id, mapping: { time: null, position: { kind: 'geometry' }, spray: null }, ...stored })
			.returning();
		const problem = await processUpload(db, u.id, async () => {}).then(() => null, (e) => e);
		expect(problem).toBeInstanceOf(UploadProblem);
		expect((problem as Error).message).toMatch(/log\.zip: zip entry 'log\.shp' expands \d+ times \(over 100x\); refused as a possible zip bomb/);
		const [after] = await db.select({ fixesTotal: uploads.fixesTotal }).from(uploads).where(eq(uploads.id, u.id));
		expect(after.fixesTotal ?? 0).toBe(0);
	});
});
