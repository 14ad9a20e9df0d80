// Cleaned fixes are kept per application and upload as one compressed blob: a small JSON
// header, then the typed arrays' bytes. Enough to recompute coverage for a new grid, a zone
// drawn later or a fixed catalogue without reading the raw file again.
import { gunzipSync, gzipSync } from 'node:zlib';
import type { FixColumns, SprayState } from '$lib/compute/types';

type Header = {
	v: 1;
	count: number;
	spray: { kind: SprayState['kind']; nozzleCount?: number; nozzleWords?: number };
	columns: string[];
};

type Column = Float64Array | Float32Array | Uint32Array | Uint8Array;

function columnsOf(f: FixColumns): [string, Column][] {
	const out: [string, Column][] = [
		['timeS', f.timeS],
		['lng', f.lng],
		['lat', f.lat],
		['sourceRow', f.sourceRow]
	];
	if (f.spray.kind === 'nozzles') out.push(['spray', f.spray.bits]);
	else if (f.spray.kind === 'activeWidth') out.push(['spray', f.spray.widthM]);
	else out.push(['spray', f.spray.fraction]);
	if (f.master) out.push(['master', f.master]);
	if (f.rateLPerM2) out.push(['rateLPerM2', f.rateLPerM2]);
	if (f.flowLPerS) out.push(['flowLPerS', f.flowLPerS]);
	if (f.speedMPerS) out.push(['speedMPerS', f.speedMPerS]);
	if (f.pressurePa) out.push(['pressurePa', f.pressurePa]);
	if (f.boomHeightM) out.push(['boomHeightM', f.boomHeightM]);
	if (f.isStart) out.push(['isStart', f.isStart]);
	return out;
}

export function packFixes(f: FixColumns): Buffer {
	const columns = columnsOf(f);
	const header: Header = {
		v: 1,
		count: f.count,
		spray:
			f.spray.kind === 'nozzles'
				? { kind: 'nozzles', nozzleCount: f.spray.nozzleCount, nozzleWords: f.spray.nozzleWords }
				: { kind: f.spray.kind },
		columns: columns.map(([name]) => name)
	};
	const head = Buffer.from(JSON.stringify(header));
	const parts: Buffer[] = [Buffer.alloc(4), head];
	parts[0].writeUInt32LE(head.length);
	for (const [, array] of columns) {
		// Pad to 8 bytes so every array can be viewed in place after unpacking.
		const offset = parts.reduce((n, p) => n + p.length, 0);
		if (offset % 8) parts.push(Buffer.alloc(8 - (offset % 8)));
		parts.push(Buffer.from(array.buffer, array.byteOffset, array.byteLength));
	}
	return gzipSync(Buffer.concat(parts), { level: 1 });
}

export function unpackFixes(packed: Buffer): FixColumns {
	const raw = gunzipSync(packed);
	// Copy into a fresh, aligned buffer so typed arrays can view it.
	const bytes = new Uint8Array(raw.length);
	bytes.set(raw);
	const headLength = new DataView(bytes.buffer).getUint32(0, true);
	const header = JSON.parse(new TextDecoder().decode(bytes.subarray(4, 4 + headLength))) as Header;
	if (header.v !== 1) throw new Error(`unknown packed fixes version ${header.v}`);
	const n = header.count;
	let offset = 4 + headLength;
	const take = <T extends Column>(make: (buf: ArrayBuffer, at: number, len: number) => T, length: number, size: number): T => {
		if (offset % 8) offset += 8 - (offset % 8);
		const view = make(bytes.buffer, offset, length);
		offset += length * size;
		return view;
	};
	const out: Partial<FixColumns> & { count: number } = { count: n };
	for (const name of header.columns) {
		switch (name) {
			case 'timeS': out.timeS = take((b, o, l) => new Float64Array(b, o, l), n, 8); break;
			case 'lng': out.lng = take((b, o, l) => new Float64Array(b, o, l), n, 8); break;
			case 'lat': out.lat = take((b, o, l) => new Float64Array(b, o, l), n, 8); break;
			case 'sourceRow': out.sourceRow = take((b, o, l) => new Uint32Array(b, o, l), n, 4); break;
			case 'master': out.master = take((b, o, l) => new Uint8Array(b, o, l), n, 1); break;
			case 'rateLPerM2': out.rateLPerM2 = take((b, o, l) => new Float32Array(b, o, l), n, 4); break;
			case 'flowLPerS': out.flowLPerS = take((b, o, l) => new Float32Array(b, o, l), n, 4); break;
			case 'speedMPerS': out.speedMPerS = take((b, o, l) => new Float32Array(b, o, l), n, 4); break;
			case 'pressurePa': out.pressurePa = take((b, o, l) => new Float32Array(b, o, l), n, 4); break;
			case 'boomHeightM': out.boomHeightM = take((b, o, l) => new Float32Array(b, o, l), n, 4); break;
			case 'isStart': out.isStart = take((b, o, l) => new Uint8Array(b, o, l), n, 1); break;
			case 'spray': {
				const s = header.spray;
				if (s.kind === 'nozzles') {
					const words = s.nozzleWords!;
					out.spray = { kind: 'nozzles', nozzleCount: s.nozzleCount!, nozzleWords: words, bits: take((b, o, l) => new Uint32Array(b, o, l), n * words, 4) };
				} else if (s.kind === 'activeWidth') {
					out.spray = { kind: 'activeWidth', widthM: take((b, o, l) => new Float32Array(b, o, l), n, 4) };
				} else {
					out.spray = { kind: 'fraction', fraction: take((b, o, l) => new Float32Array(b, o, l), n, 4) };
				}
				break;
			}
			default:
				throw new Error(`unknown packed column ${name}`);
		}
	}
	return out as FixColumns;
}

/** Several logs' fixes for one application, joined and sorted by time. */
export function concatFixes(parts: FixColumns[]): FixColumns {
	if (parts.length === 1) return parts[0];
	if (new Set(parts.map((p) => p.spray.kind)).size > 1) throw new Error('logs of one application record spraying differently');
	const total = parts.reduce((n, p) => n + p.count, 0);
	// One index over all parts, ordered by time; every column is read through it.
	const owner = new Uint32Array(total);
	const local = new Uint32Array(total);
	const times = new Float64Array(total);
	let k = 0;
	parts.forEach((p, pi) => {
		for (let i = 0; i < p.count; i++, k++) {
			owner[k] = pi;
			local[k] = i;
			times[k] = p.timeS[i];
		}
	});
	const order = Array.from({ length: total }, (_, i) => i).sort((a, b) => times[a] - times[b]);
	const pick = (get: (p: FixColumns) => Float64Array | Float32Array | Uint32Array | Uint8Array | undefined, make: (n: number) => Float64Array | Float32Array | Uint32Array | Uint8Array) => {
		if (parts.some((p) => !get(p))) return undefined;
		const dst = make(total);
		for (let i = 0; i < total; i++) dst[i] = get(parts[owner[order[i]]])![local[order[i]]];
		return dst;
	};
	// Measurements only checked for quality: a log without the column is missing there (NaN),
	// so one log with pressure still gets checked beside one without.
	const pickMeasured = (get: (p: FixColumns) => Float32Array | undefined) => {
		if (!parts.some((p) => get(p))) return undefined;
		return pick((p) => get(p) ?? new Float32Array(p.count).fill(NaN), (n) => new Float32Array(n)) as Float32Array;
	};
	let spray: SprayState;
	const first = parts[0].spray;
	if (first.kind === 'nozzles') {
		const w = first.nozzleWords;
		if (parts.some((p) => p.spray.kind !== 'nozzles' || p.spray.nozzleWords !== w)) {
			throw new Error('logs of one application have different nozzle counts');
		}
		const bits = new Uint32Array(total * w);
		for (let i = 0; i < total; i++) {
			const p = parts[owner[order[i]]].spray as Extract<SprayState, { kind: 'nozzles' }>;
			const j = local[order[i]];
			bits.set(p.bits.subarray(j * w, j * w + w), i * w);
		}
		spray = { ...first, bits };
	} else if (first.kind === 'activeWidth') {
		spray = { kind: 'activeWidth', widthM: pick((p) => (p.spray as { widthM: Float32Array }).widthM, (n) => new Float32Array(n)) as Float32Array };
	} else {
		spray = { kind: 'fraction', fraction: pick((p) => (p.spray as { fraction: Float32Array }).fraction, (n) => new Float32Array(n)) as Float32Array };
	}
	return {
		count: total,
		timeS: pick((p) => p.timeS, (n) => new Float64Array(n)) as Float64Array,
		lng: pick((p) => p.lng, (n) => new Float64Array(n)) as Float64Array,
		lat: pick((p) => p.lat, (n) => new Float64Array(n)) as Float64Array,
		sourceRow: pick((p) => p.sourceRow, (n) => new Uint32Array(n)) as Uint32Array,
		spray,
		master: pick((p) => p.master, (n) => new Uint8Array(n)) as Uint8Array | undefined,
		rateLPerM2: pick((p) => p.rateLPerM2, (n) => new Float32Array(n)) as Float32Array | undefined,
		flowLPerS: pick((p) => p.flowLPerS, (n) => new Float32Array(n)) as Float32Array | undefined,
		speedMPerS: pickMeasured((p) => p.speedMPerS),
		pressurePa: pickMeasured((p) => p.pressurePa),
		boomHeightM: pickMeasured((p) => p.boomHeightM),
		// A part without the column starts an interval at every fix.
		isStart: parts.some((p) => p.isStart)
			? (pick((p) => p.isStart ?? new Uint8Array(p.count).fill(1), (n) => new Uint8Array(n)) as Uint8Array)
			: undefined
	};
}
