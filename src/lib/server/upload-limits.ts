// Limits on what a browser may send in one form upload, checked before the body is held whole.
// SvelteKit's own BODY_SIZE_LIMIT is switched off (scripts/start.sh sets it to Infinity so the
// as-applied log API can stream big logs to disk), so each form that takes a file bounds itself
// here: the declared length first, then the bytes as they arrive, then the number of files.
// The other limits: log API size (UPLOAD_MAX_BYTES, routes/api/farms/[farm]/uploads/+server.ts),
// zip inflation (DEFAULT_ZIP_LIMITS, lib/ingest/zip.ts), whole-file logs (MAX_WHOLE_FILE_BYTES,
// lib/ingest/log.ts), note photos (PHOTO_MAX_BYTES, lib/notes/photo.ts).

export { BOUNDARY_FILE_MAX_BYTES } from '$lib/ingest/limits';
/** Room for the form's other fields (names, rates, ticks) beside the file. */
export const FORM_OVERHEAD_BYTES = 256 * 1024;

const mb = (n: number) => `${Math.round((n / 1024 / 1024) * 10) / 10} MB`;

export type LimitedForm = { form: FormData } | { refused: string; status: 400 | 413 };

/**
 * The request's form data, or a sentence saying why it was refused: a body larger than maxBytes
 * (declared or actually sent; reading stops at the first chunk past the limit), or more than
 * maxFiles files in total.
 */
export async function readFormWithin(
	request: Request,
	limits: { maxBytes: number; maxFiles: number; what: string }
): Promise<LimitedForm> {
	const tooLarge = { refused: `The upload is too large: ${limits.what} may be at most ${mb(limits.maxBytes - FORM_OVERHEAD_BYTES)}.`, status: 413 as const };
	const declared = Number(request.headers.get('content-length'));
	if (declared > limits.maxBytes) return tooLarge;
	let form: FormData;
	if (!request.body) form = await request.formData();
	else {
		const chunks: Uint8Array[] = [];
		let size = 0;
		const reader = request.body.getReader();
		for (;;) {
			const { done, value } = await reader.read();
			if (done) break;
			size += value.length;
			if (size > limits.maxBytes) {
				await reader.cancel();
				return tooLarge;
			}
			chunks.push(value);
		}
		const body = new Uint8Array(size);
		let at = 0;
		for (const c of chunks) (body.set(c, at), (at += c.length));
		try {
			form = await new Response(body, { headers: { 'content-type': request.headers.get('content-type') ?? '' } }).formData();
		} catch {
			return { refused: 'The upload could not be read as a form; send it from the page’s form.', status: 400 };
		}
	}
	const files = [...form.values()].filter((v) => v instanceof File && (v.size > 0 || v.name));
	if (files.length > limits.maxFiles)
		return { refused: `${files.length} files were sent; ${limits.what} takes ${limits.maxFiles === 1 ? 'one file' : `at most ${limits.maxFiles} files`} at a time.`, status: 400 };
	return { form };
}
