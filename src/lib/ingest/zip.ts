// Unzipping uploads without trusting them: names that climb out of a folder, zip bombs and
// absurd entry counts are refused before and while inflating. Reads the central directory
// itself so declared sizes are known up front, then inflates each entry with fflate's streaming
// inflater, counting real output so a lying header cannot get past the caps.
import { Inflate } from 'fflate';
import { IngestError } from './issues';
import { concatBytes } from './text';

export type ZipLimits = {
	/** Sum of all inflated entries, bytes. */
	maxTotalBytes: number;
	maxEntries: number;
	/** Largest inflated/compressed ratio allowed for an entry bigger than ratioMinBytes. */
	maxRatio: number;
	/** Small entries compress wildly (a .cpg of zeros) and are harmless below this size. */
	ratioMinBytes: number;
};

export const DEFAULT_ZIP_LIMITS: ZipLimits = {
	maxTotalBytes: 200 * 1024 * 1024,
	maxEntries: 1000,
	maxRatio: 100,
	ratioMinBytes: 1024 * 1024
};

type CentralEntry = {
	name: string;
	method: number;
	flags: number;
	compressedSize: number;
	size: number;
	localOffset: number;
};

const OUT_CHUNK = 64 * 1024;

/** The checks on an entry name: no parent folders, no absolute paths, no drive letters. */
export function unsafeNameReason(name: string): string | null {
	const parts = name.split(/[\\/]/);
	if (parts.includes('..')) return 'climbs out of its folder with ..';
	if (name.startsWith('/') || name.startsWith('\\')) return 'is an absolute path';
	if (/^[a-zA-Z]:/.test(name)) return 'starts with a drive letter';
	if (name.includes('\0')) return 'contains a NUL character';
	return null;
}

function readCentralDirectory(file: string, bytes: Uint8Array): CentralEntry[] {
	const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
	// End of central directory: 22 bytes plus a comment of at most 65535 bytes (APPNOTE 4.3.16).
	let eocd = -1;
	for (let i = bytes.length - 22; i >= Math.max(0, bytes.length - 22 - 65535); i--) {
		if (view.getUint32(i, true) === 0x06054b50) {
			eocd = i;
			break;
		}
	}
	if (eocd < 0) throw new IngestError(file, 'is not a zip archive (no end of central directory found)');
	let count = view.getUint16(eocd + 10, true);
	let cdOffset = view.getUint32(eocd + 16, true);
	if (count === 0xffff || cdOffset === 0xffffffff) {
		// Zip64: the locator sits just before the EOCD and points at the zip64 EOCD record.
		const loc = eocd - 20;
		if (loc < 0 || view.getUint32(loc, true) !== 0x07064b50)
			throw new IngestError(file, 'has a damaged zip64 directory');
		const z64 = Number(view.getBigUint64(loc + 8, true));
		if (z64 + 56 > bytes.length || z64 < 0 || view.getUint32(z64, true) !== 0x06064b50)
			throw new IngestError(file, 'has a damaged zip64 directory');
		count = Number(view.getBigUint64(z64 + 32, true));
		cdOffset = Number(view.getBigUint64(z64 + 48, true));
	}
	const entries: CentralEntry[] = [];
	let at = cdOffset;
	for (let n = 0; n < count; n++) {
		if (at + 46 > bytes.length || view.getUint32(at, true) !== 0x02014b50)
			throw new IngestError(file, `has a damaged zip directory at entry ${n + 1}`);
		const flags = view.getUint16(at + 8, true);
		const method = view.getUint16(at + 10, true);
		let compressedSize = view.getUint32(at + 20, true);
		let size = view.getUint32(at + 24, true);
		const nameLen = view.getUint16(at + 28, true);
		const extraLen = view.getUint16(at + 30, true);
		const commentLen = view.getUint16(at + 32, true);
		let localOffset = view.getUint32(at + 42, true);
		// The variable parts must lie inside the file; a cut or spliced archive puts them past its end.
		if (at + 46 + nameLen + extraLen + commentLen > bytes.length)
			throw new IngestError(file, `has a damaged zip directory at entry ${n + 1}`);
		const nameBytes = bytes.subarray(at + 46, at + 46 + nameLen);
		// Bit 11 marks UTF-8 names; otherwise CP437, read here as Latin-1 (close enough for names).
		const name = new TextDecoder(flags & 0x800 ? 'utf-8' : 'windows-1252').decode(nameBytes);
		// Zip64 extra field (id 1) carries the 64-bit values for those set to 0xffffffff.
		let e = at + 46 + nameLen;
		const extraEnd = e + extraLen;
		while (e + 4 <= extraEnd) {
			const id = view.getUint16(e, true);
			const len = view.getUint16(e + 2, true);
			if (id === 1) {
				let p = e + 4;
				const big = () => {
					if (p + 8 > Math.min(e + 4 + len, extraEnd))
						throw new IngestError(file, `has a damaged zip64 field at entry ${n + 1}`);
					const v = Number(view.getBigUint64(p, true));
					p += 8;
					return v;
				};
				if (size === 0xffffffff) size = big();
				if (compressedSize === 0xffffffff) compressedSize = big();
				if (localOffset === 0xffffffff) localOffset = big();
			}
			e += 4 + len;
		}
		entries.push({ name, method, flags, compressedSize, size, localOffset });
		at = extraEnd + commentLen;
	}
	return entries;
}

/** Unzips every file entry (folders skipped) after checking names and sizes. Throws IngestError
 * whose message names the archive and, where it applies, the entry. */
export function unzipSafe(
	file: string,
	bytes: Uint8Array,
	limits: Partial<ZipLimits> = {}
): Map<string, Uint8Array> {
	const lim = { ...DEFAULT_ZIP_LIMITS, ...limits };
	const entries = readCentralDirectory(file, bytes);
	if (entries.length > lim.maxEntries)
		throw new IngestError(file, `holds ${entries.length} entries; at most ${lim.maxEntries} are accepted`);

	let declaredTotal = 0;
	for (const entry of entries) {
		const reason = unsafeNameReason(entry.name);
		if (reason) throw new IngestError(file, `zip entry '${entry.name}' ${reason}; refused`);
		if (entry.flags & 1) throw new IngestError(file, `zip entry '${entry.name}' is encrypted`);
		if (entry.method !== 0 && entry.method !== 8)
			throw new IngestError(file, `zip entry '${entry.name}' uses compression method ${entry.method}; only stored and deflate are read`);
		declaredTotal += entry.size;
		checkRatio(file, entry.name, entry.size, entry.compressedSize, lim);
	}
	if (declaredTotal > lim.maxTotalBytes) throw tooBig(file, declaredTotal, lim);

	const out = new Map<string, Uint8Array>();
	const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
	let total = 0;
	for (const entry of entries) {
		if (entry.name.endsWith('/')) continue;
		const lh = entry.localOffset;
		if (lh + 30 > bytes.length || view.getUint32(lh, true) !== 0x04034b50)
			throw new IngestError(file, `zip entry '${entry.name}' has a damaged local header`);
		const start = lh + 30 + view.getUint16(lh + 26, true) + view.getUint16(lh + 28, true);
		const end = start + entry.compressedSize;
		if (end > bytes.length) throw new IngestError(file, `zip entry '${entry.name}' is cut off`);
		const data = bytes.subarray(start, end);
		let inflated: Uint8Array;
		if (entry.method === 0) {
			inflated = data;
		} else {
			const parts: Uint8Array[] = [];
			let produced = 0;
			const inflater = new Inflate((chunk) => {
				produced += chunk.length;
				// Real output is checked against both caps: headers can lie about sizes.
				if (total + produced > lim.maxTotalBytes) throw tooBig(file, total + produced, lim);
				if (produced > entry.size)
					throw new IngestError(file, `zip entry '${entry.name}' inflates past its declared size of ${entry.size} bytes`);
				checkRatio(file, entry.name, produced, entry.compressedSize, lim);
				parts.push(chunk);
			});
			try {
				for (let i = 0; i < data.length; i += OUT_CHUNK) {
					inflater.push(data.subarray(i, i + OUT_CHUNK), i + OUT_CHUNK >= data.length);
				}
				if (data.length === 0) inflater.push(new Uint8Array(0), true);
			} catch (err) {
				if (err instanceof IngestError) throw err;
				throw new IngestError(file, `zip entry '${entry.name}' is damaged (${err instanceof Error ? err.message : err})`);
			}
			inflated = concatBytes(parts, produced);
		}
		if (inflated.length !== entry.size)
			throw new IngestError(file, `zip entry '${entry.name}' inflated to ${inflated.length} bytes, not the declared ${entry.size}`);
		total += inflated.length;
		out.set(entry.name, inflated);
	}
	return out;
}

function checkRatio(file: string, name: string, size: number, compressed: number, lim: ZipLimits) {
	if (size > lim.ratioMinBytes && size > lim.maxRatio * Math.max(compressed, 1)) {
		const ratio = Math.round(size / Math.max(compressed, 1));
		throw new IngestError(
			file,
			`zip entry '${name}' expands ${ratio} times (over ${lim.maxRatio}x); refused as a possible zip bomb`
		);
	}
}

function tooBig(file: string, bytes: number, lim: ZipLimits) {
	const mb = (n: number) => `${Math.round(n / 1024 / 1024)} MB`;
	return new IngestError(file, `unzips to more than ${mb(lim.maxTotalBytes)} (at least ${mb(bytes)}); refused`);
}


/** True when the bytes start like a zip archive (local file header or empty archive). */
export function looksLikeZip(bytes: Uint8Array): boolean {
	return bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && (bytes[2] === 3 || bytes[2] === 5);
}
