// Bytes to text for uploaded logs: UTF-8 with or without a byte order mark, or Latin-1 as
// older terminals and spreadsheet exports write it. Windows-1252 is decoded for "Latin-1"
// because WHATWG's TextDecoder maps the label latin1 to it, and it is a superset for printables.

export type TextEncodingName = 'utf-8' | 'windows-1252';

/** How many leading bytes decide the encoding; headers and units live there. */
export const SNIFF_BYTES = 64 * 1024;

export function hasUtf8Bom(bytes: Uint8Array): boolean {
	return bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf;
}

/** UTF-8 if the first chunk decodes strictly as UTF-8 (a BOM settles it), otherwise windows-1252.
 * A multibyte character cut at the end of the sample is not held against UTF-8. */
export function detectEncoding(firstBytes: Uint8Array): { encoding: TextEncodingName; hasBom: boolean } {
	if (hasUtf8Bom(firstBytes)) return { encoding: 'utf-8', hasBom: true };
	const sample = firstBytes.subarray(0, SNIFF_BYTES);
	try {
		new TextDecoder('utf-8', { fatal: true }).decode(sample, { stream: true });
		return { encoding: 'utf-8', hasBom: false };
	} catch {
		return { encoding: 'windows-1252', hasBom: false };
	}
}

/** Whole-buffer decode with the same detection; the BOM is dropped. */
export function decodeBytes(bytes: Uint8Array): { text: string; encoding: TextEncodingName; hasBom: boolean } {
	const { encoding, hasBom } = detectEncoding(bytes);
	const text = new TextDecoder(encoding, { ignoreBOM: false }).decode(bytes);
	return { text, encoding, hasBom };
}

/** Streaming decoder: feed chunks, characters split across chunks come out whole. The encoding
 * is decided on the first non-empty chunk unless given. `replaced` counts U+FFFD produced,
 * which happens when a UTF-8 guess meets Latin-1 bytes further down the file. */
export class ChunkDecoder {
	encoding: TextEncodingName | null;
	hasBom = false;
	replaced = 0;
	private decoder: TextDecoder | null = null;

	constructor(encoding?: TextEncodingName) {
		this.encoding = encoding ?? null;
	}

	decode(chunk: Uint8Array): string {
		if (!this.decoder) {
			if (chunk.length === 0) return '';
			if (!this.encoding) {
				const found = detectEncoding(chunk);
				this.encoding = found.encoding;
				this.hasBom = found.hasBom;
			} else this.hasBom = this.encoding === 'utf-8' && hasUtf8Bom(chunk);
			// ignoreBOM false: TextDecoder itself drops a leading UTF-8 BOM.
			this.decoder = new TextDecoder(this.encoding);
		}
		return this.count(this.decoder.decode(chunk, { stream: true }));
	}

	end(): string {
		return this.decoder ? this.count(this.decoder.decode()) : '';
	}

	private count(text: string): string {
		if (this.encoding === 'utf-8') {
			for (let i = text.indexOf('\ufffd'); i !== -1; i = text.indexOf('\ufffd', i + 1)) this.replaced++;
		}
		return text;
	}
}

/** Any byte source as an async stream of chunks. */
export async function* toChunks(
	source: AsyncIterable<Uint8Array> | Iterable<Uint8Array> | Uint8Array
): AsyncIterable<Uint8Array> {
	if (source instanceof Uint8Array) {
		yield source;
		return;
	}
	for await (const chunk of source as AsyncIterable<Uint8Array>) yield chunk;
}

/** Gathers a stream into one buffer, refusing more than maxBytes (formats that need it whole). */
export async function collectBytes(
	source: AsyncIterable<Uint8Array> | Iterable<Uint8Array> | Uint8Array,
	maxBytes: number
): Promise<Uint8Array> {
	if (source instanceof Uint8Array) {
		if (source.length > maxBytes) throw new RangeError(`larger than ${maxBytes} bytes`);
		return source;
	}
	const parts: Uint8Array[] = [];
	let total = 0;
	for await (const chunk of toChunks(source)) {
		total += chunk.length;
		if (total > maxBytes) throw new RangeError(`larger than ${maxBytes} bytes`);
		parts.push(chunk);
	}
	return concatBytes(parts, total);
}

/** Chunks joined into one array of `total` bytes (the first chunk itself when there is one). */
export function concatBytes(parts: Uint8Array[], total: number): Uint8Array {
	if (parts.length === 1) return parts[0];
	const out = new Uint8Array(total);
	let at = 0;
	for (const p of parts) {
		out.set(p, at);
		at += p.length;
	}
	return out;
}
