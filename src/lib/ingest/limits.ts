// Size limits the browser can say at once, before sending anything; the server checks again
// (src/lib/server/upload-limits.ts). Pure, so pages may import it.

/** Boundary and zone files: a farm's fields or a field's zones are far under this. */
export const BOUNDARY_FILE_MAX_BYTES = 25 * 1024 * 1024;

/** The sentence for a chosen file over the limit, or '' when it fits. */
export function fileTooBig(file: { name: string; size: number } | null | undefined, maxBytes: number, what: string): string {
	if (!file || file.size <= maxBytes) return '';
	return `${file.name} is ${(file.size / 1024 / 1024).toFixed(1)} MB; ${what} may be at most ${maxBytes / 1024 / 1024} MB.`;
}
