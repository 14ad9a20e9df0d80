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
import { auditLog, fields } from '$lib/server/db/schema';
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
