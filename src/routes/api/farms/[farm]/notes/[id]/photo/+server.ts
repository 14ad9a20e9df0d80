// A note's photo (?size=full, the bytes as uploaded) or its thumbnail (the default, a small WebP),
// only for readers of the farm's notes. The type is the one the bytes were checked to be.
import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as notes from '$lib/server/notes';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'notes.view', { api: true });
	const size = event.url.searchParams.get('size') === 'full' ? 'full' : 'thumb';
	const photo = await notes.photo(actor, event.params.id, size);
	if (!photo) error(404, 'This note has no photo, or there is no such note in this farm.');
	const etag = `"${photo.sha256}"`;
	const headers = {
		'content-type': photo.type,
		'content-length': String(photo.bytes.length),
		// Content-addressed, so a cached copy is right as long as the note points at it.
		etag,
		'cache-control': 'private, max-age=3600',
		'x-content-type-options': 'nosniff',
		'content-disposition': 'inline',
		'content-security-policy': "default-src 'none'; img-src 'self'; style-src 'unsafe-inline'"
	};
	if (event.request.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
	return new Response(new Uint8Array(photo.bytes), { headers });
};
