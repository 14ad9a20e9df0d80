// Notes pinned to a point of the farm, or to a zone, for a season, with an optional photo. A
// zone note keeps a point too (where it was placed, or a point inside the zone) so every note
// has a pin on the map; the zone is what it is about. Scoped by farm;
// landlords are refused outright (notes are the team's working notes, see guard.ts). Authors
// edit and delete their own notes, managers any; every change is audited.
import { error } from '@sveltejs/kit';
import { booleanPointInPolygon, pointOnFeature } from '@turf/turf';
import { and, desc, eq, inArray, ne, sql } from 'drizzle-orm';
import sharp from 'sharp';
import { db } from '$lib/server/db';
import { fields, notes, users, zones, type Note, type Zone } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import { record } from '$lib/server/audit';
import { putPhoto, readPhoto, removePhoto } from '$lib/server/storage/photo-store';
import { bodyProblem, photoProblem, sniffPhotoType, PHOTO_MAX_BYTES } from '$lib/notes/photo';
import { readFormWithin } from '$lib/server/upload-limits';

export type NoteView = {
	id: string;
	fieldId: string | null;
	fieldName: string | null;
	/** The zone the note is pinned to, or null for a note about its point only. */
	zoneId: string | null;
	zoneName: string | null;
	/** Zones of the farm whose shape holds the note's point: what an edit may pin it to. */
	zonesHere: ZoneChoice[];
	season: number;
	lng: number;
	lat: number;
	body: string;
	hasPhoto: boolean;
	authorName: string | null;
	isOwn: boolean;
	canEdit: boolean;
	createdAt: string;
	updatedAt: string;
};

export type ZoneChoice = { id: string; name: string };

export const SEASON_MIN = 1990;
export const SEASON_MAX = 2100;
/** Thumbnails fit in this square, in pixels: enough for a list and a map card on a phone. */
const THUMB_PX = 480;
/** Decoding bigger images than this (pixels) is refused: a decompression bomb, not a photo. */
const MAX_INPUT_PIXELS = 60_000_000;

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function requireView(actor: Actor) {
	if (!may(actor.role, 'notes.view')) error(403, 'Your role in this farm does not allow reading notes.');
}
function requireWrite(actor: Actor) {
	if (!may(actor.role, 'notes.write')) error(403, 'Your role in this farm does not allow writing notes.');
}

/** Authors may change their own notes while their role writes notes; managers any note of the farm. */
export function mayEdit(actor: Actor, note: Pick<Note, 'authorId'>): boolean {
	return may(actor.role, 'notes.moderate') || (may(actor.role, 'notes.write') && note.authorId === actor.user.id);
}

const columns = {
	id: notes.id,
	fieldId: notes.fieldId,
	fieldName: fields.name,
	zoneId: notes.zoneId,
	zoneName: zones.name,
	season: notes.season,
	lng: notes.lng,
	lat: notes.lat,
	body: notes.body,
	photoSha256: notes.photoSha256,
	authorId: notes.authorId,
	authorName: users.name,
	createdAt: notes.createdAt,
	updatedAt: notes.updatedAt
};

function select() {
	return db
		.select(columns)
		.from(notes)
		.leftJoin(fields, eq(fields.id, notes.fieldId))
		.leftJoin(zones, eq(zones.id, notes.zoneId))
		.leftJoin(users, eq(users.id, notes.authorId));
}

type ZoneShape = { id: string; name: string; fieldId: string; geometry: Zone['geometry'] };

async function farmZones(actor: Actor): Promise<ZoneShape[]> {
	return db
		.select({ id: zones.id, name: zones.name, fieldId: zones.fieldId, geometry: zones.geometry })
		.from(zones)
		.where(eq(zones.farmId, actor.farm.id))
		.orderBy(zones.name);
}

/** The zones whose shape holds the point (zones of a field do not overlap, so one per field at most). */
function zonesAt(all: ZoneShape[], lng: number, lat: number): ZoneChoice[] {
	return all.filter((z) => booleanPointInPolygon([lng, lat], z.geometry)).map((z) => ({ id: z.id, name: z.name }));
}
type Row = Awaited<ReturnType<typeof select>>[number];

function view(actor: Actor, r: Row, farmZoneShapes: ZoneShape[]): NoteView {
	return {
		id: r.id,
		fieldId: r.fieldId,
		fieldName: r.fieldName,
		zoneId: r.zoneId,
		zoneName: r.zoneName,
		zonesHere: zonesAt(farmZoneShapes, r.lng, r.lat),
		season: r.season,
		lng: r.lng,
		lat: r.lat,
		body: r.body,
		hasPhoto: r.photoSha256 !== null,
		authorName: r.authorName,
		isOwn: r.authorId === actor.user.id,
		canEdit: mayEdit(actor, r),
		createdAt: r.createdAt.toISOString(),
		updatedAt: r.updatedAt.toISOString()
	};
}

/** The farm's notes, newest first; optionally of some seasons, one field or one zone. */
export async function list(actor: Actor, filter: { seasons?: number[]; fieldId?: string; zoneId?: string } = {}): Promise<NoteView[]> {
	requireView(actor);
	if (filter.fieldId !== undefined && !uuidPattern.test(filter.fieldId)) return [];
	if (filter.zoneId !== undefined && !uuidPattern.test(filter.zoneId)) return [];
	const [rows, shapes] = await Promise.all([
		select()
			.where(
				and(
					eq(notes.farmId, actor.farm.id),
					filter.seasons ? (filter.seasons.length ? inArray(notes.season, filter.seasons) : sql`false`) : undefined,
					filter.fieldId ? eq(notes.fieldId, filter.fieldId) : undefined,
					filter.zoneId ? eq(notes.zoneId, filter.zoneId) : undefined
				)
			)
			.orderBy(desc(notes.season), desc(notes.createdAt)),
		farmZones(actor)
	]);
	return rows.map((r) => view(actor, r, shapes));
}

async function row(actor: Actor, id: string) {
	if (!uuidPattern.test(id)) return null;
	const [note] = await db.select().from(notes).where(and(eq(notes.farmId, actor.farm.id), eq(notes.id, id)));
	return note ?? null;
}

export async function get(actor: Actor, id: string): Promise<NoteView | null> {
	requireView(actor);
	if (!uuidPattern.test(id)) return null;
	const [r] = await select().where(and(eq(notes.farmId, actor.farm.id), eq(notes.id, id)));
	return r ? view(actor, r, await farmZones(actor)) : null;
}

/** The farm's field whose boundary holds the point, or null (a yard, a gate, a track). */
async function fieldAt(actor: Actor, lng: number, lat: number): Promise<string | null> {
	const rows = await db.select({ id: fields.id, boundary: fields.boundary }).from(fields).where(eq(fields.farmId, actor.farm.id));
	return rows.find((f) => booleanPointInPolygon([lng, lat], f.boundary))?.id ?? null;
}

export type PhotoUpload = { fileName: string; bytes: Uint8Array };
/** A position may be left out (NaN) when a zone is given: the note is then pinned inside the zone. */
export type NoteInput = { season: number; lng: number; lat: number; body: string; photo: PhotoUpload | null; zoneId?: string | null };
export type Problem = { field: 'body' | 'season' | 'position' | 'photo' | 'zone' | 'note'; message: string };
type Stored = { photoSha256: string; photoType: string; photoBytes: number; thumbSha256: string };

function checkSeason(season: number): Problem | null {
	return Number.isInteger(season) && season >= SEASON_MIN && season <= SEASON_MAX
		? null
		: { field: 'season', message: `The season must be a year from ${SEASON_MIN} to ${SEASON_MAX}.` };
}

const zoneGone = { field: 'zone', message: 'That zone is no longer in this farm (it may have just been deleted); pin the note to its point instead.' } as const;

/**
 * The zone a note is to be pinned to, checked against the farm and the note's point: a note
 * pinned to a zone stands inside it, so its pin on the map lies in the zone it speaks of.
 */
async function zoneFor(actor: Actor, zoneId: string, at: { lng: number; lat: number } | null): Promise<ZoneShape | Problem> {
	if (!uuidPattern.test(zoneId)) return zoneGone;
	const [zone] = await db
		.select({ id: zones.id, name: zones.name, fieldId: zones.fieldId, geometry: zones.geometry })
		.from(zones)
		.where(and(eq(zones.farmId, actor.farm.id), eq(zones.id, zoneId)));
	if (!zone) return zoneGone;
	if (at && !booleanPointInPolygon([at.lng, at.lat], zone.geometry)) {
		return { field: 'zone', message: `The note’s point lies outside zone “${zone.name}”; place it inside the zone, or pin it to the point only.` };
	}
	return zone;
}

/** Stores the photo and its thumbnail; a problem when the bytes are no usable image. */
async function storePhoto(photo: PhotoUpload): Promise<Stored | Problem> {
	const problem = photoProblem(photo.fileName, photo.bytes);
	if (problem) return { field: 'photo', message: problem };
	let thumb: Buffer;
	try {
		// rotate() turns the picture as its EXIF orientation says, so a phone photo stands upright.
		thumb = await sharp(photo.bytes, { limitInputPixels: MAX_INPUT_PIXELS })
			.rotate()
			.resize(THUMB_PX, THUMB_PX, { fit: 'inside', withoutEnlargement: true })
			.webp({ quality: 78 })
			.toBuffer();
	} catch {
		return { field: 'photo', message: `${photo.fileName || 'The photo'} starts like an image but could not be read as one; it may be damaged or too large.` };
	}
	return {
		photoSha256: await putPhoto(photo.bytes),
		photoType: sniffPhotoType(photo.bytes)!,
		photoBytes: photo.bytes.length,
		thumbSha256: await putPhoto(thumb)
	};
}

/** Removes a photo's files when no other note of any farm holds the same bytes. */
async function dropPhotoFiles(photoSha256: string | null, thumbSha256: string | null, exceptNoteId: string) {
	for (const [sha, column] of [[photoSha256, notes.photoSha256], [thumbSha256, notes.thumbSha256]] as const) {
		if (!sha) continue;
		const [other] = await db
			.select({ id: notes.id })
			.from(notes)
			.where(and(ne(notes.id, exceptNoteId), eq(column, sha)))
			.limit(1);
		if (!other) await removePhoto(sha);
	}
}

export async function create(actor: Actor, input: NoteInput): Promise<{ note: NoteView } | { problem: Problem }> {
	requireWrite(actor);
	const body = input.body.trim();
	const bodyIssue = bodyProblem(body);
	if (bodyIssue) return { problem: { field: 'body', message: bodyIssue } };
	const seasonIssue = checkSeason(input.season);
	if (seasonIssue) return { problem: seasonIssue };
	const placed = Math.abs(input.lng) <= 180 && Math.abs(input.lat) <= 90;
	let zone: ZoneShape | null = null;
	if (input.zoneId) {
		const found = await zoneFor(actor, input.zoneId, placed ? input : null);
		if ('field' in found) return { problem: found };
		zone = found;
	}
	if (!placed && !zone) {
		return { problem: { field: 'position', message: 'Pick the note’s place on the map (longitude −180 to 180, latitude −90 to 90).' } };
	}
	// A zone note made without a point (from the zone's own page) stands at a point inside the zone.
	const [lng, lat] = placed ? [input.lng, input.lat] : pointOnFeature(zone!.geometry).geometry.coordinates;
	let stored: Stored | null = null;
	if (input.photo) {
		const result = await storePhoto(input.photo);
		if ('field' in result) return { problem: result };
		stored = result;
	}
	const fieldId = zone ? zone.fieldId : await fieldAt(actor, lng, lat);
	const [note] = await db
		.insert(notes)
		.values({ farmId: actor.farm.id, fieldId, zoneId: zone?.id ?? null, season: input.season, lng, lat, body, authorId: actor.user.id, ...stored })
		.returning({ id: notes.id });
	await record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'note.created',
		targetType: 'note',
		targetId: note.id,
		detail: { season: input.season, fieldId, zone: zone ? { id: zone.id, name: zone.name } : null, lng, lat, photo: stored ? { sha256: stored.photoSha256, bytes: stored.photoBytes } : null }
	});
	return { note: (await get(actor, note.id))! };
}

/** zoneId: a zone to pin to, null to pin to the point only, undefined to leave as it is. */
export type NoteChange = { body: string; season: number; photo: PhotoUpload | 'remove' | null; zoneId?: string | null };

/** null when there is no such note in the farm; 403 when the actor may not change it. */
export async function update(actor: Actor, id: string, change: NoteChange): Promise<{ note: NoteView } | { problem: Problem } | null> {
	requireWrite(actor);
	const note = await row(actor, id);
	if (!note) return null;
	if (!mayEdit(actor, note)) error(403, 'Only the note’s author or a manager may change it.');
	const body = change.body.trim();
	const bodyIssue = bodyProblem(body);
	if (bodyIssue) return { problem: { field: 'body', message: bodyIssue } };
	const seasonIssue = checkSeason(change.season);
	if (seasonIssue) return { problem: seasonIssue };
	let zoneId = note.zoneId;
	let zoneName: string | null = null;
	if (change.zoneId !== undefined && change.zoneId !== note.zoneId) {
		if (change.zoneId === null) zoneId = null;
		else {
			const found = await zoneFor(actor, change.zoneId, note);
			if ('field' in found) return { problem: found };
			zoneId = found.id;
			zoneName = found.name;
		}
	}
	let photo: Partial<Stored> | { photoSha256: null; photoType: null; photoBytes: null; thumbSha256: null } = {};
	if (change.photo === 'remove') photo = { photoSha256: null, photoType: null, photoBytes: null, thumbSha256: null };
	else if (change.photo) {
		const result = await storePhoto(change.photo);
		if ('field' in result) return { problem: result };
		photo = result;
	}
	await db.update(notes).set({ body, season: change.season, zoneId, ...photo, updatedAt: sql`now()` }).where(eq(notes.id, id));
	const photoChanged = 'photoSha256' in photo && photo.photoSha256 !== note.photoSha256;
	if (photoChanged) await dropPhotoFiles(note.photoSha256, note.thumbSha256, id);
	const changed: Record<string, unknown> = {};
	if (body !== note.body) changed.body = { from: note.body, to: body };
	if (change.season !== note.season) changed.season = { from: note.season, to: change.season };
	if (zoneId !== note.zoneId) changed.zone = { from: note.zoneId, to: zoneId, name: zoneName };
	if (photoChanged) changed.photo = { from: note.photoSha256, to: photo.photoSha256 ?? null };
	if (Object.keys(changed).length) {
		await record({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'note.edited',
			targetType: 'note',
			targetId: id,
			detail: { ...changed, authorId: note.authorId }
		});
	}
	return { note: (await get(actor, id))! };
}

/** The deleted note's text (for an undo), or null when there is no such note in the farm. */
export async function remove(actor: Actor, id: string): Promise<{ body: string } | null> {
	requireWrite(actor);
	const note = await row(actor, id);
	if (!note) return null;
	if (!mayEdit(actor, note)) error(403, 'Only the note’s author or a manager may delete it.');
	await db.delete(notes).where(eq(notes.id, id));
	await dropPhotoFiles(note.photoSha256, note.thumbSha256, id);
	await record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'note.deleted',
		targetType: 'note',
		targetId: id,
		// What was deleted stays readable in the audit log; the photo's bytes do not.
		detail: { season: note.season, fieldId: note.fieldId, zoneId: note.zoneId, lng: note.lng, lat: note.lat, body: note.body, authorId: note.authorId, photo: note.photoSha256 }
	});
	return { body: note.body };
}

/** A note's photo or thumbnail for a reader of the farm's notes; null when there is none. */
export async function photo(actor: Actor, id: string, size: 'thumb' | 'full'): Promise<{ bytes: Buffer; type: string; sha256: string } | null> {
	requireView(actor);
	const note = await row(actor, id);
	const sha = size === 'thumb' ? note?.thumbSha256 : note?.photoSha256;
	if (!note || !sha) return null;
	const bytes = await readPhoto(sha);
	if (!bytes) return null;
	return { bytes, type: size === 'thumb' ? 'image/webp' : (note.photoType ?? 'application/octet-stream'), sha256: sha };
}

// ---------------------------------------------------------------- forms

/** Bigger request bodies than this are refused before they are read: the photo plus the text. */
export const NOTE_FORM_MAX_BYTES = PHOTO_MAX_BYTES + 256 * 1024;

/**
 * The request's form data, or a sentence when the body is too big. The limit is checked on the
 * declared length first and on the bytes as they arrive, so a huge upload is never held whole.
 */
export async function readNoteForm(request: Request): Promise<FormData | { tooLarge: string }> {
	const read = await readFormWithin(request, { maxBytes: NOTE_FORM_MAX_BYTES, maxFiles: 1, what: 'a note' });
	if ('form' in read) return read.form;
	return { tooLarge: read.status === 413 ? `The note is too large: a photo may be at most ${PHOTO_MAX_BYTES / 1024 / 1024} MB.` : `${read.refused} Attach one photo.` };
}

async function photoFrom(form: FormData): Promise<PhotoUpload | null> {
	const file = form.get('photo');
	if (!(file instanceof File) || file.size === 0) return null;
	return { fileName: file.name, bytes: new Uint8Array(await file.arrayBuffer()) };
}

const numberFrom = (form: FormData, key: string) => {
	const raw = String(form.get(key) ?? '').trim();
	return raw === '' ? NaN : Number(raw);
};

export async function inputFrom(form: FormData): Promise<NoteInput> {
	return {
		season: numberFrom(form, 'season'),
		lng: numberFrom(form, 'lng'),
		lat: numberFrom(form, 'lat'),
		body: String(form.get('body') ?? ''),
		photo: await photoFrom(form),
		zoneId: zoneFrom(form) ?? null
	};
}

/** The form's `zone`: absent leaves the pin as it is, '' pins to the point only. */
function zoneFrom(form: FormData): string | null | undefined {
	if (!form.has('zone')) return undefined;
	const raw = String(form.get('zone')).trim();
	return raw === '' ? null : raw;
}

export async function changeFrom(form: FormData): Promise<NoteChange> {
	return {
		season: numberFrom(form, 'season'),
		body: String(form.get('body') ?? ''),
		photo: form.get('removePhoto') === 'on' ? 'remove' : await photoFrom(form),
		zoneId: zoneFrom(form)
	};
}
