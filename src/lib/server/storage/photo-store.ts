// Note photos and their thumbnails, content-addressed by SHA-256 beside the raw store
// (PATCHBOOK_DATA_DIR/photos/<sha256[0:2]>/<sha256>). Photos are size-limited before they get here,
// so they are written from memory; like raw uploads, the folder moves to object storage later.
import { createHash, randomUUID } from 'node:crypto';
import { mkdir, readFile, rename, rm, writeFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';

export function photoStoreDir(): string {
	return resolve(process.env.PATCHBOOK_DATA_DIR ?? '.data', 'photos');
}

export function photoPath(sha256: string): string {
	if (!/^[0-9a-f]{64}$/.test(sha256)) throw new Error('not a sha256');
	return join(photoStoreDir(), sha256.slice(0, 2), sha256);
}

export async function putPhoto(bytes: Uint8Array): Promise<string> {
	const sha256 = createHash('sha256').update(bytes).digest('hex');
	const tmp = join(photoStoreDir(), 'tmp', randomUUID());
	await mkdir(dirname(tmp), { recursive: true });
	await writeFile(tmp, bytes);
	const final = photoPath(sha256);
	await mkdir(dirname(final), { recursive: true });
	await rename(tmp, final); // same bytes, same name: a second copy replaces the first
	return sha256;
}

/** The stored bytes, or null when the file is gone. */
export async function readPhoto(sha256: string): Promise<Buffer | null> {
	try {
		return await readFile(photoPath(sha256));
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
		throw e;
	}
}

export async function removePhoto(sha256: string): Promise<void> {
	await rm(photoPath(sha256), { force: true });
}
