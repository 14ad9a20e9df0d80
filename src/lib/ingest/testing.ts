// Helpers for the ingest tests only: bytes as a stream cut into small, awkward chunks.

export async function* chunked(bytes: Uint8Array, size: number): AsyncIterable<Uint8Array> {
	for (let i = 0; i < bytes.length; i += size) yield bytes.subarray(i, i + size);
}

export const utf8 = (s: string) => new TextEncoder().encode(s);

/** windows-1252 bytes for text whose characters are all in Latin-1. */
export function latin1(s: string): Uint8Array {
	const out = new Uint8Array(s.length);
	for (let i = 0; i < s.length; i++) {
		const c = s.charCodeAt(i);
		if (c > 0xff) throw new Error(`not Latin-1: ${s[i]}`);
		out[i] = c;
	}
	return out;
}
