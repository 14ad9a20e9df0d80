import { error, json } from '@sveltejs/kit';
import { env } from '$env/dynamic/private';
import { requireRole } from '$lib/server/auth/guard';
import * as rawStore from '$lib/server/storage/raw-store';
import * as uploads from '$lib/server/uploads';
import type { RequestHandler } from './$types';

const defaultLimitBytes = 500 * 1024 * 1024;

/**
 * One as-applied log per request, the raw bytes as the body (so the browser can show upload
 * progress and the server streams to disk): POST ?name=<file name>.
 */
export const POST: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'uploads.create', { api: true });
	const fileName = (event.url.searchParams.get('name') ?? '').trim().slice(0, 255);
	if (!fileName) error(400, 'Say the file name: ?name=<file name>.');
	const format = uploads.formatOf(fileName);
	if (!format) {
		error(415, `${fileName}: Patchbook reads as-applied logs as CSV (.csv, .txt), GeoJSON (.geojson, .json) or zipped shapefiles (.zip).`);
	}
	const limitBytes = Number(env.UPLOAD_MAX_BYTES ?? defaultLimitBytes);
	const declared = Number(event.request.headers.get('content-length') ?? NaN);
	if (declared > limitBytes) error(413, `${fileName} is larger than the limit of ${Math.round(limitBytes / 1e6)} MB.`);
	if (!event.request.body) error(400, `${fileName} is empty.`);

	let stored: { sha256: string; sizeBytes: number };
	try {
		stored = await rawStore.put(event.request.body, limitBytes);
	} catch (e) {
		if (e instanceof rawStore.TooLargeError) error(413, `${fileName}: ${e.message}`);
		throw e;
	}
	if (stored.sizeBytes === 0) error(400, `${fileName} is empty.`);
	const { upload, duplicate } = await uploads.create(actor, { fileName, format, ...stored });
	return json(
		{ id: upload.id, status: upload.status, duplicate, fileName: upload.fileName, createdAt: upload.createdAt },
		{ status: duplicate ? 200 : 201 }
	);
};

export const GET: RequestHandler = async (event) => {
	const actor = await requireRole(event, 'uploads', { api: true });
	return json({ uploads: await uploads.list(actor) });
};
