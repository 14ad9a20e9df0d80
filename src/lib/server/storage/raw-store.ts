// Raw uploads kept forever, content-addressed by SHA-256: the same bytes are stored once,
// and a fixed mapping or catalogue can always be re-applied to the original file.
// The store is a folder today; an S3-compatible bucket later keeps the same interface.
import { createHash, randomUUID } from 'node:crypto';
import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, rename, rm, stat } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { Readable, Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';

export class TooLargeError extends Error {
	constructor(readonly limitBytes: number) {
		super(`The file is larger than the limit of ${Math.round(limitBytes / 1e6)} MB.`);
	}
}

export function rawStoreDir(): string {
	return resolve(process.env.PATCHBOOK_DATA_DIR ?? '.data', 'raw');
}

export function pathOf(sha256: string): string {
	if (!/^[0-9a-f]{64}$/.test(sha256)) throw new Error('not a sha256');
	return join(rawStoreDir(), sha256.slice(0, 2), sha256);
}

/** Streams a body to the store while hashing it; never holds the whole file in memory. */
export async function put(
	body: ReadableStream<Uint8Array> | Readable,
	limitBytes: number,
	onProgress?: (bytes: number) => void
): Promise<{ sha256: string; sizeBytes: number }> {
	const dir = rawStoreDir();
	const tmp = join(dir, 'tmp', randomUUID());
	await mkdir(dirname(tmp), { recursive: true });
	const hash = createHash('sha256');
	let size = 0;
	const meter = new Transform({
		transform(chunk: Buffer, _enc, done) {
			size += chunk.length;
			if (size > limitBytes) return done(new TooLargeError(limitBytes));
			hash.update(chunk);
			onProgress?.(size);
			done(null, chunk);
		}
	});
	const source = body instanceof Readable ? body : Readable.fromWeb(body as import('node:stream/web').ReadableStream);
	try {
		await pipeline(source, meter, createWriteStream(tmp));
	} catch (e) {
		await rm(tmp, { force: true });
		throw e;
	}
	const sha256 = hash.digest('hex');
	const final = pathOf(sha256);
	await mkdir(dirname(final), { recursive: true });
	await rename(tmp, final); // same bytes, same name: a second copy simply replaces the first
	return { sha256, sizeBytes: size };
}

/** The stored bytes as chunks, for streaming parsers. */
export async function* read(sha256: string, chunkBytes = 1 << 20): AsyncGenerator<Uint8Array> {
	for await (const chunk of createReadStream(pathOf(sha256), { highWaterMark: chunkBytes })) {
		yield chunk as Buffer;
	}
}

export async function exists(sha256: string): Promise<boolean> {
	try {
		await stat(pathOf(sha256));
		return true;
	} catch {
		return false;
	}
}
