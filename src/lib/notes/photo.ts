// What a note's photo may be: JPEG, PNG or WebP up to a size limit, recognised by the file's
// first bytes (the browser's type and the file name can say anything).

export const PHOTO_MAX_BYTES = 10 * 1024 * 1024;
export const PHOTO_TYPES = ['image/jpeg', 'image/png', 'image/webp'] as const;
export type PhotoType = (typeof PHOTO_TYPES)[number];

const startsWith = (bytes: Uint8Array, signature: number[], offset = 0) =>
	bytes.length >= offset + signature.length && signature.every((b, i) => bytes[offset + i] === b);

/**
 * The image type the bytes begin with, or null.
 * JPEG: FF D8 FF (ISO/IEC 10918-1 SOI marker and the next marker's FF); PNG: the eight-byte
 * signature 89 50 4E 47 0D 0A 1A 0A (RFC 2083 §3.1); WebP: "RIFF", a size, "WEBP" (RFC 9649 §2).
 * @example sniffPhotoType(new Uint8Array([0xff, 0xd8, 0xff, 0xe0])) // 'image/jpeg'
 */
export function sniffPhotoType(bytes: Uint8Array): PhotoType | null {
	if (startsWith(bytes, [0xff, 0xd8, 0xff])) return 'image/jpeg';
	if (startsWith(bytes, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'image/png';
	if (startsWith(bytes, [0x52, 0x49, 0x46, 0x46]) && startsWith(bytes, [0x57, 0x45, 0x42, 0x50], 8)) return 'image/webp';
	return null;
}

/** Why these bytes cannot be a note's photo (a sentence naming the file), or null. */
export function photoProblem(fileName: string, bytes: Uint8Array): string | null {
	const name = fileName || 'The photo';
	if (bytes.length > PHOTO_MAX_BYTES) {
		return `${name} is ${(bytes.length / 1024 / 1024).toFixed(1)} MB; a photo may be at most ${PHOTO_MAX_BYTES / 1024 / 1024} MB.`;
	}
	if (bytes.length === 0) return `${name} is empty.`;
	if (!sniffPhotoType(bytes)) return `${name} is not a JPEG, PNG or WebP image (judged by its content, not its name).`;
	return null;
}

export const NOTE_MAX_CHARS = 2000;

/** Why a note's text cannot be saved, or null. */
export function bodyProblem(body: string): string | null {
	if (body.trim().length === 0) return 'Write something in the note.';
	if (body.length > NOTE_MAX_CHARS) return `A note may be at most ${NOTE_MAX_CHARS} characters (this one has ${body.length}).`;
	return null;
}
