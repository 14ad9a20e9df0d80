// Notes against real rows and real image bytes (made with sharp, read back by our magic-byte
// check and by sharp's own decoder). Photos go to a temporary PATCHBOOK_DATA_DIR.
import { mkdtempSync } from 'node:fs';
import { existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join as joinPath } from 'node:path';
import { and, eq } from 'drizzle-orm';
import sharp, { type Sharp } from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { db } from '$lib/server/db';
import { auditLog, fields, zones } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { PHOTO_MAX_BYTES, sniffPhotoType } from '$lib/notes/photo';
import { photoPath } from '$lib/server/storage/photo-store';
import * as notes from './notes';

process.env.PATCHBOOK_DATA_DIR = mkdtempSync(joinPath(tmpdir(), 'patchbook-notes-'));

type Roles = 'manager' | 'agronomist' | 'agronomist2' | 'operator' | 'landlord';
let a: Record<Roles, Actor>;
let outsider: Actor;
let fieldId: string;
let png: Uint8Array;
let jpeg: Uint8Array;
let webp: Uint8Array;

// A 1200 x 800 picture: big enough that the thumbnail must shrink it.
const picture = () => sharp({ create: { width: 1200, height: 800, channels: 3, background: { r: 138, g: 90, b: 43 } } });
const bytesOf = async (s: Sharp) => new Uint8Array(await s.toBuffer());
const input = (over: Partial<notes.NoteInput> = {}): notes.NoteInput => ({ season: 2025, lng: 0.005, lat: 0.005, body: 'Kochia patch by the gate, check after rain.', photo: null, ...over });

beforeAll(async () => {
	const farm = await makeFarm();
	const f = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	a = {} as typeof a;
	for (const role of ['manager', 'agronomist', 'agronomist2', 'operator', 'landlord'] as const) {
		const u = await makeUser();
		const r = role === 'agronomist2' ? 'agronomist' : role;
		await join(farm.id, u.id, r);
		a[role] = { user: u, farm: f, role: r };
	}
	const [field] = await db
		.insert(fields)
		.values({ farmId: farm.id, name: 'Invented square', ...fieldGeometryColumns({ type: 'Polygon', coordinates: [[[0, 0], [0.01, 0], [0.01, 0.01], [0, 0.01], [0, 0]]] }) })
		.returning();
	fieldId = field.id;
	const farm2 = await makeFarm();
	const u2 = await makeUser();
	await join(farm2.id, u2.id, 'manager');
	outsider = { user: u2, farm: { id: farm2.id, slug: farm2.slug, name: farm2.name, currency: farm2.currency }, role: 'manager' };
	png = await bytesOf(picture().png());
	jpeg = await bytesOf(picture().jpeg());
	webp = await bytesOf(picture().webp());
});

describe('photo type by magic bytes', () => {
	it('JPEG, PNG and WebP are recognised from their first bytes (ISO/IEC 10918-1, RFC 2083, RFC 9649)', () => {
		expect(sniffPhotoType(jpeg)).toBe('image/jpeg');
		expect(sniffPhotoType(png)).toBe('image/png');
		expect(sniffPhotoType(webp)).toBe('image/webp');
	});
	it('GIF, HEIC-like, text and a RIFF that is not WebP are not photos here', async () => {
		expect(sniffPhotoType(await bytesOf(picture().gif()))).toBeNull();
		expect(sniffPhotoType(new TextEncoder().encode('hello, not an image'))).toBeNull();
		// ISO BMFF box 'ftyp' + 'heic' brand, as HEIC files start.
		expect(sniffPhotoType(new Uint8Array([0, 0, 0, 24, 0x66, 0x74, 0x79, 0x70, 0x68, 0x65, 0x69, 0x63]))).toBeNull();
		expect(sniffPhotoType(new TextEncoder().encode('RIFF\u0000\u0000\u0000\u0000WAVEfmt '))).toBeNull();
	});
});

describe('notes', () => {
	it('an agronomist pins a note with a photo: field found by its boundary, thumbnail made, audited', async () => {
		const r = await notes.create(a.agronomist, input({ photo: { fileName: 'patch.png', bytes: png } }));
		if (!('note' in r)) throw new Error(r.problem.message);
		expect(r.note).toMatchObject({ fieldId, fieldName: 'Invented square', season: 2025, hasPhoto: true, isOwn: true, canEdit: true, zoneId: null });
		const thumb = await notes.photo(a.operator, r.note.id, 'thumb');
		expect(sniffPhotoType(thumb!.bytes)).toBe('image/webp');
		const meta = await sharp(thumb!.bytes).metadata();
		expect(Math.max(meta.width!, meta.height!)).toBe(480);
		const full = await notes.photo(a.operator, r.note.id, 'full');
		expect(full!.type).toBe('image/png');
		expect(new Uint8Array(full!.bytes)).toEqual(png);
		const [entry] = await db.select().from(auditLog).where(and(eq(auditLog.action, 'note.created'), eq(auditLog.targetId, r.note.id)));
		expect(entry.actorId).toBe(a.agronomist.user.id);
	});

	it('a point outside every field is kept with no field; the field filter lists only its notes', async () => {
		const r = await notes.create(a.manager, input({ lng: 0.05, lat: 0.05, body: 'Gate to the east pasture sticks.' }));
		if (!('note' in r)) throw new Error(r.problem.message);
		expect(r.note.fieldId).toBeNull();
		const inField = await notes.list(a.manager, { fieldId });
		expect(inField.every((n) => n.fieldId === fieldId)).toBe(true);
		expect((await notes.list(a.manager)).some((n) => n.id === r.note.id)).toBe(true);
	});

	it('bad input gets a sentence naming what is wrong, and nothing is stored', async () => {
		const before = (await notes.list(a.manager)).length;
		const problem = async (i: notes.NoteInput) => {
			const r = await notes.create(a.agronomist, i);
			return 'problem' in r ? r.problem : null;
		};
		expect(await problem(input({ body: '   ' }))).toEqual({ field: 'body', message: 'Write something in the note.' });
		expect((await problem(input({ body: 'x'.repeat(2001) })))?.message).toMatch(/at most 2000 characters \(this one has 2001\)/);
		expect((await problem(input({ season: 1800 })))?.field).toBe('season');
		expect((await problem(input({ lng: NaN })))?.field).toBe('position');
		expect((await problem(input({ photo: { fileName: 'notes.txt', bytes: new TextEncoder().encode('not a picture') } })))?.message).toBe(
			'notes.txt is not a JPEG, PNG or WebP image (judged by its content, not its name).'
		);
		const big = new Uint8Array(PHOTO_MAX_BYTES + 1);
		big.set(jpeg.subarray(0, 4));
		expect((await problem(input({ photo: { fileName: 'huge.jpg', bytes: big } })))?.message).toBe('huge.jpg is 10.0 MB; a photo may be at most 10 MB.');
		// Starts like a JPEG, then garbage: the decoder refuses it.
		const broken = new Uint8Array([...jpeg.subarray(0, 20), ...new Uint8Array(500).fill(7)]);
		expect((await problem(input({ photo: { fileName: 'broken.jpg', bytes: broken } })))?.message).toMatch(/^broken\.jpg starts like an image but could not be read/);
		expect((await notes.list(a.manager)).length).toBe(before);
	});

	it('operators read notes but may not write them; landlords may not even read them', async () => {
		expect((await notes.list(a.operator)).length).toBeGreaterThan(0);
		expect(await statusOf(notes.create(a.operator, input()))).toBe(403);
		expect(await statusOf(notes.list(a.landlord))).toBe(403);
		const [any] = await notes.list(a.manager);
		expect(await statusOf(notes.photo(a.landlord, any.id, 'thumb'))).toBe(403);
	});

	it('the author and managers edit; another agronomist may not; every edit is audited', async () => {
		const r = await notes.create(a.agronomist, input({ body: 'First words.' }));
		if (!('note' in r)) throw new Error('not created');
		const id = r.note.id;
		expect((await notes.get(a.agronomist2, id))!.canEdit).toBe(false);
		expect(await statusOf(notes.update(a.agronomist2, id, { body: 'Hijack', season: 2025, photo: null }))).toBe(403);
		const own = await notes.update(a.agronomist, id, { body: 'Second words.', season: 2026, photo: { fileName: 'p.jpg', bytes: jpeg } });
		expect(own && 'note' in own && own.note).toMatchObject({ body: 'Second words.', season: 2026, hasPhoto: true });
		const byManager = await notes.update(a.manager, id, { body: 'Second words, checked.', season: 2026, photo: null });
		expect(byManager && 'note' in byManager && byManager.note.body).toBe('Second words, checked.');
		const edits = await db.select().from(auditLog).where(and(eq(auditLog.action, 'note.edited'), eq(auditLog.targetId, id)));
		expect(edits.map((e) => e.actorId).sort()).toEqual([a.agronomist.user.id, a.manager.user.id].sort());
		expect(edits.find((e) => e.actorId === a.manager.user.id)!.detail).toMatchObject({ body: { from: 'Second words.', to: 'Second words, checked.' } });
	});

	it('removing or replacing a photo deletes its files when no other note holds them', async () => {
		const r = await notes.create(a.agronomist, input({ photo: { fileName: 'w.webp', bytes: webp } }));
		if (!('note' in r)) throw new Error('not created');
		const stored = await notes.photo(a.agronomist, r.note.id, 'full');
		expect(existsSync(photoPath(stored!.sha256))).toBe(true);
		const changed = await notes.update(a.agronomist, r.note.id, { body: r.note.body, season: 2025, photo: 'remove' });
		expect(changed && 'note' in changed && changed.note.hasPhoto).toBe(false);
		expect(existsSync(photoPath(stored!.sha256))).toBe(false);
		expect(await notes.photo(a.agronomist, r.note.id, 'thumb')).toBeNull();
	});

	it('delete: author or manager only, audited with the text that was deleted', async () => {
		const r = await notes.create(a.agronomist, input({ body: 'Delete me later.' }));
		if (!('note' in r)) throw new Error('not created');
		expect(await statusOf(notes.remove(a.agronomist2, r.note.id))).toBe(403);
		expect(await notes.remove(a.manager, r.note.id)).toEqual({ body: 'Delete me later.' });
		expect(await notes.get(a.manager, r.note.id)).toBeNull();
		const [entry] = await db.select().from(auditLog).where(and(eq(auditLog.action, 'note.deleted'), eq(auditLog.targetId, r.note.id)));
		expect(entry.detail).toMatchObject({ body: 'Delete me later.', authorId: a.agronomist.user.id });
		expect(await notes.remove(a.manager, r.note.id)).toBeNull();
	});

	it('another farm’s notes are not found, and a malformed id is simply not found', async () => {
		const [mine] = await notes.list(a.manager);
		expect(await notes.get(outsider, mine.id)).toBeNull();
		expect(await notes.update(outsider, mine.id, { body: 'x', season: 2025, photo: null })).toBeNull();
		expect(await notes.photo(outsider, mine.id, 'full')).toBeNull();
		expect(await notes.list(outsider)).toEqual([]);
		expect(await notes.get(a.manager, 'not-a-uuid')).toBeNull();
	});

	it('seasons filter the list', async () => {
		const s2025 = await notes.list(a.manager, { seasons: [2025] });
		expect(s2025.length).toBeGreaterThan(0);
		expect(s2025.every((n) => n.season === 2025)).toBe(true);
		expect(await notes.list(a.manager, { seasons: [] })).toEqual([]);
	});
});

describe('notes pinned to a zone', () => {
	let westId: string;
	let otherFarmZoneId: string;
	// The west half of the invented square; areas are not what these tests are about.
	const westHalf = { type: 'Polygon' as const, coordinates: [[[0, 0], [0.005, 0], [0.005, 0.01], [0, 0.01], [0, 0]]] };
	const westPoint = { lng: 0.002, lat: 0.004 };
	const eastPoint = { lng: 0.008, lat: 0.004 };

	beforeAll(async () => {
		const [west] = await db.insert(zones).values({ farmId: a.manager.farm.id, fieldId, name: 'West half', geometry: westHalf, areaM2: 1, source: 'drawn' }).returning();
		westId = west.id;
		const [otherField] = await db
			.insert(fields)
			.values({ farmId: outsider.farm.id, name: 'Elsewhere', ...fieldGeometryColumns({ type: 'Polygon', coordinates: [[[0, 0], [0.01, 0], [0.01, 0.01], [0, 0.01], [0, 0]]] }) })
			.returning();
		const [z] = await db.insert(zones).values({ farmId: outsider.farm.id, fieldId: otherField.id, name: 'Theirs', geometry: westHalf, areaM2: 1, source: 'drawn' }).returning();
		otherFarmZoneId = z.id;
	});

	const created = async (over: Partial<notes.NoteInput>) => {
		const r = await notes.create(a.agronomist, input(over));
		if (!('note' in r)) throw new Error(r.problem.message);
		return r.note;
	};

	it('a note placed in a zone may be pinned to it: zone named, field set, offered as the zone here', async () => {
		const n = await created({ ...westPoint, zoneId: westId, body: 'Waterhemp came back along the west side.' });
		expect(n).toMatchObject({ zoneId: westId, zoneName: 'West half', fieldId, fieldName: 'Invented square', lng: westPoint.lng, lat: westPoint.lat });
		expect(n.zonesHere).toEqual([{ id: westId, name: 'West half' }]);
		const [entry] = await db.select().from(auditLog).where(and(eq(auditLog.action, 'note.created'), eq(auditLog.targetId, n.id)));
		expect(entry.detail).toMatchObject({ zone: { id: westId, name: 'West half' } });
	});

	it('a zone note written without a point (from the zone page) is pinned at a point inside the zone', async () => {
		const n = await created({ lng: NaN, lat: NaN, zoneId: westId, body: 'Plan a pre-emergence pass here.' });
		expect(n.zoneId).toBe(westId);
		expect(n.fieldId).toBe(fieldId);
		expect(n.lng).toBeGreaterThan(0);
		expect(n.lng).toBeLessThan(0.005);
		expect(n.lat).toBeGreaterThan(0);
		expect(n.lat).toBeLessThan(0.01);
	});

	it('a point outside the zone, another farm’s zone or a malformed id: a sentence, and nothing stored', async () => {
		const before = (await notes.list(a.manager)).length;
		const problem = async (over: Partial<notes.NoteInput>) => {
			const r = await notes.create(a.agronomist, input(over));
			return 'problem' in r ? r.problem : null;
		};
		expect(await problem({ ...eastPoint, zoneId: westId })).toEqual({
			field: 'zone',
			message: 'The note’s point lies outside zone “West half”; place it inside the zone, or pin it to the point only.'
		});
		expect((await problem({ ...westPoint, zoneId: otherFarmZoneId }))?.message).toMatch(/^That zone is no longer in this farm/);
		expect((await problem({ ...westPoint, zoneId: 'west' }))?.field).toBe('zone');
		expect((await notes.list(a.manager)).length).toBe(before);
	});

	it('an edit pins to the point only or back to the zone, audited; a zone elsewhere is refused', async () => {
		const n = await created({ ...westPoint, zoneId: westId, body: 'Check the headland.' });
		const unpinned = await notes.update(a.agronomist, n.id, { body: n.body, season: n.season, photo: null, zoneId: null });
		expect(unpinned && 'note' in unpinned && unpinned.note).toMatchObject({ zoneId: null, zoneName: null, zonesHere: [{ id: westId, name: 'West half' }] });
		const kept = await notes.update(a.agronomist, n.id, { body: 'Check the headland again.', season: n.season, photo: null });
		expect(kept && 'note' in kept && kept.note.zoneId).toBeNull();
		const repinned = await notes.update(a.manager, n.id, { body: n.body, season: n.season, photo: null, zoneId: westId });
		expect(repinned && 'note' in repinned && repinned.note.zoneName).toBe('West half');
		const edits = await db.select().from(auditLog).where(and(eq(auditLog.action, 'note.edited'), eq(auditLog.targetId, n.id)));
		expect(edits.map((e) => (e.detail as { zone?: { to: string | null } }).zone?.to)).toEqual(expect.arrayContaining([null, westId]));
		const outside = await created({ ...eastPoint, body: 'East side, no zone.' });
		expect(outside.zonesHere).toEqual([]);
		const refused = await notes.update(a.agronomist, outside.id, { body: outside.body, season: outside.season, photo: null, zoneId: westId });
		expect(refused && 'problem' in refused && refused.problem.field).toBe('zone');
	});

	it('the zone filter lists its notes only; deleting the zone leaves its notes on their points', async () => {
		const [spare] = await db
			.insert(zones)
			.values({ farmId: a.manager.farm.id, fieldId, name: 'East half', geometry: { type: 'Polygon', coordinates: [[[0.005, 0], [0.01, 0], [0.01, 0.01], [0.005, 0.01], [0.005, 0]]] }, areaM2: 1, source: 'drawn' })
			.returning();
		const n = await created({ ...eastPoint, zoneId: spare.id, body: 'Thistle in the east half.' });
		expect((await notes.list(a.manager, { zoneId: spare.id })).map((x) => x.id)).toEqual([n.id]);
		expect((await notes.list(a.manager, { zoneId: westId })).every((x) => x.zoneId === westId)).toBe(true);
		await db.delete(zones).where(eq(zones.id, spare.id));
		expect(await notes.get(a.manager, n.id)).toMatchObject({ zoneId: null, zoneName: null, lng: eastPoint.lng, fieldId });
	});

	it('the form: no `zone` leaves an edit’s pin alone, an empty one pins to the point only', async () => {
		const form = (entries: Record<string, string>) => {
			const f = new FormData();
			for (const [k, v] of Object.entries(entries)) f.set(k, v);
			return f;
		};
		expect((await notes.changeFrom(form({ body: 'x', season: '2025' }))).zoneId).toBeUndefined();
		expect((await notes.changeFrom(form({ body: 'x', season: '2025', zone: '' }))).zoneId).toBeNull();
		expect((await notes.inputFrom(form({ body: 'x', season: '2025', zone: westId }))).zoneId).toBe(westId);
		expect((await notes.inputFrom(form({ body: 'x', season: '2025' }))).zoneId).toBeNull();
	});
});

describe('reading the note form', () => {
	const multipart = (bytes: Uint8Array) => {
		const form = new FormData();
		form.set('body', 'With a photo');
		form.set('photo', new File([new Uint8Array(bytes)], 'p.jpg', { type: 'image/jpeg' }));
		return new Request('http://x/', { method: 'POST', body: form });
	};

	it('a form within the limit is read whole', async () => {
		const form = await notes.readNoteForm(multipart(jpeg));
		expect(form instanceof FormData && (form.get('photo') as File).size).toBe(jpeg.length);
	});

	it('too large by its declared length: refused before reading', async () => {
		const request = new Request('http://x/', { method: 'POST', body: 'x', headers: { 'content-length': String(notes.NOTE_FORM_MAX_BYTES + 1) } });
		expect(await notes.readNoteForm(request)).toEqual({ tooLarge: 'The note is too large: a photo may be at most 10 MB.' });
	});

	it('too large while streaming, with no length declared', async () => {
		const chunk = new Uint8Array(1024 * 1024);
		let sent = 0;
		const body = new ReadableStream<Uint8Array>({
			pull(controller) {
				if (sent++ > 12) controller.close();
				else controller.enqueue(chunk);
			}
		});
		const request = new Request('http://x/', { method: 'POST', body, duplex: 'half', headers: { 'content-type': 'multipart/form-data; boundary=x' } } as RequestInit);
		expect(await notes.readNoteForm(request)).toHaveProperty('tooLarge');
		expect(sent).toBeLessThan(13);
	});
});
