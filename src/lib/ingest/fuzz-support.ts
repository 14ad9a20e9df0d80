// For the *.fuzz.test.ts files only: run counts, the per-case time bound, the memory cap, and
// byte mutations of real files. A reader under fuzzing may return a result or a clear problem
// (an IngestError naming the file); anything else it throws, a case slower than the bound, or a
// batch that grows memory past the cap is a bug.
import { readFileSync } from 'node:fs';
import { Worker } from 'node:worker_threads';
import fc from 'fast-check';
import { expect } from 'vitest';
import { IngestError } from './issues';

/** FUZZ_RUNS=5000 npx vitest run src/lib/ingest/log.fuzz.test.ts runs every property that often. */
export function runs(standard: number): number {
	const n = Number(process.env.FUZZ_RUNS);
	return Number.isInteger(n) && n > 0 ? n : standard;
}

/** Wall-clock bound for one case. Generous because the machine running `npm test` is shared;
 * the inputs are at most a few hundred kB, which the readers handle in milliseconds. */
export const CASE_MS = 2000;
/** Heap growth allowed across one whole property (hundreds of cases). A reader that keeps what
 * it read, or inflates a small input into something huge, goes past this. */
export const HEAP_CAP_BYTES = 256 * 1024 * 1024;

/** The generic wrapper toIssue() gives an exception that was not an IngestError: a crash. */
export const CRASH_PREFIX = 'could not be read: ';

/** A case still running after this long is a hang. The watchdog cannot interrupt a synchronous
 * loop on this thread, so it kills the test process: the run fails instead of hanging. */
export const HANG_MS = 20_000;

/** FUZZ_SEED replays a run (the seed is printed with the counts and by the watchdog). */
function seed(): number {
	const n = Number(process.env.FUZZ_SEED);
	return Number.isInteger(n) ? n : (Date.now() ^ (Math.random() * 0x7fffffff)) | 0;
}

// Shared with the watchdog thread: [0] case number, [1] 1 while a case runs.
const WATCHDOG_JS = `
const { workerData, parentPort } = require('node:worker_threads');
const { writeSync } = require('node:fs');
const cell = new Int32Array(workerData.sab);
let last = -1, since = Date.now();
setInterval(() => {
	const n = Atomics.load(cell, 0), running = Atomics.load(cell, 1);
	if (n !== last || !running) { last = n; since = Date.now(); return; }
	if (Date.now() - since > workerData.hangMs) {
		// writeSync: a worker's process.stderr goes through the blocked main thread.
		writeSync(2, 'fuzz watchdog: case ' + n + ' of ' + workerData.name + ' (seed ' + workerData.seed + ') ran over ' + workerData.hangMs + ' ms; killing the test run\\n');
		process.kill(process.pid, 'SIGKILL');
	}
}, 250);
parentPort.postMessage('ready');
`;

/** Starts the watchdog and waits until it runs: a worker needs this thread's event loop to
 * start, which a hung case would never give it. */
async function startWatchdog(name: string, seedValue: number) {
	const sab = new SharedArrayBuffer(8);
	const cell = new Int32Array(sab);
	const worker = new Worker(WATCHDOG_JS, { eval: true, execArgv: [], workerData: { sab, name, seed: seedValue, hangMs: HANG_MS } });
	await new Promise<void>((resolve, reject) => {
		worker.once('message', () => resolve());
		worker.once('error', reject);
	});
	worker.unref();
	return {
		begin: () => (Atomics.add(cell, 0, 1), Atomics.store(cell, 1, 1)),
		end: () => Atomics.store(cell, 1, 0),
		stop: () => worker.terminate()
	};
}

export type Outcome = { kind: 'ok' } | { kind: 'problem'; message: string };

/** Runs one case under the time bound. Returns how it ended; throws (failing the property) when
 * the reader threw something that is not an IngestError or took longer than CASE_MS. Every
 * reader here is synchronous or resolves without I/O, so the deadline is checked when the call
 * returns; a reader that never returns is caught by the watchdog thread (HANG_MS) instead. */
export async function bounded(file: string, run: () => unknown): Promise<Outcome> {
	const started = performance.now();
	let outcome: Outcome;
	try {
		const returned = (await run()) as Outcome | undefined;
		// A reader that reports problems instead of throwing says so through the returned outcome.
		outcome = returned?.kind === 'problem' ? returned : { kind: 'ok' };
	} catch (err) {
		if (!(err instanceof IngestError)) throw new Error(`reader threw a raw ${(err as Error)?.name ?? typeof err}: ${(err as Error)?.message ?? err}`);
		expect(err.issue.file).toBe(file);
		expect(err.issue.message.length).toBeGreaterThan(3);
		outcome = { kind: 'problem', message: err.message };
	}
	const ms = performance.now() - started;
	if (ms > CASE_MS) throw new Error(`case took ${Math.round(ms)} ms (bound ${CASE_MS} ms)`);
	return outcome;
}

/** Runs a property and checks the heap afterwards; prints how the cases ended. */
export async function fuzz<T>(
	name: string,
	arb: fc.Arbitrary<T>,
	numRuns: number,
	check: (value: T) => Promise<Outcome>
): Promise<void> {
	const counts = { ok: 0, problem: 0 };
	const gc = (globalThis as { gc?: () => void }).gc;
	gc?.();
	const before = process.memoryUsage().heapUsed;
	let peak = before;
	const seedValue = seed();
	const watchdog = await startWatchdog(name, seedValue);
	try {
		await fc.assert(
			fc.asyncProperty(arb, async (value) => {
				watchdog.begin();
				try {
					const outcome = await check(value);
					counts[outcome.kind]++;
				} finally {
					watchdog.end();
				}
				peak = Math.max(peak, process.memoryUsage().heapUsed);
			}),
			{ numRuns: runs(numRuns), seed: seedValue }
		);
	} finally {
		await watchdog.stop();
	}
	const growth = peak - before;
	console.log(`fuzz ${name}: ${counts.ok} read, ${counts.problem} refused with a problem, heap peak +${Math.round(growth / 1048576)} MB (seed ${seedValue})`);
	expect(growth, `heap grew ${Math.round(growth / 1048576)} MB`).toBeLessThan(HEAP_CAP_BYTES);
}

export const fixture = (path: string) => new Uint8Array(readFileSync(path));

/** The first `lines` lines of a text file, so mutations of a big log stay quick. */
export function headOf(path: string, lines: number): string {
	return readFileSync(path, 'utf8').split('\n').slice(0, lines).join('\n');
}

const enc = new TextEncoder();
const dec = new TextDecoder();

/** Byte-level damage: cut the file short, flip bits, splice in or delete runs of bytes. */
export type ByteMutation =
	| { op: 'truncate'; at: number }
	| { op: 'flip'; at: number; bit: number }
	| { op: 'insert'; at: number; bytes: Uint8Array }
	| { op: 'delete'; at: number; len: number };

export const byteMutation: fc.Arbitrary<ByteMutation> = fc.oneof(
	fc.record({ op: fc.constant('truncate' as const), at: fc.nat() }),
	fc.record({ op: fc.constant('flip' as const), at: fc.nat(), bit: fc.integer({ min: 0, max: 7 }) }),
	fc.record({ op: fc.constant('insert' as const), at: fc.nat(), bytes: fc.uint8Array({ maxLength: 16 }) }),
	fc.record({ op: fc.constant('delete' as const), at: fc.nat(), len: fc.integer({ min: 1, max: 64 }) })
);

export function mutateBytes(input: Uint8Array, mutations: ByteMutation[]): Uint8Array {
	let b = input;
	for (const m of mutations) {
		const at = b.length ? m.at % (b.length + 1) : 0;
		if (m.op === 'truncate') b = b.slice(0, at);
		else if (m.op === 'flip') {
			if (!b.length) continue;
			b = b.slice();
			b[at % b.length] ^= 1 << m.bit;
		} else if (m.op === 'insert') {
			const out = new Uint8Array(b.length + m.bytes.length);
			out.set(b.subarray(0, at));
			out.set(m.bytes, at);
			out.set(b.subarray(at), at + m.bytes.length);
			b = out;
		} else {
			const end = Math.min(b.length, at + m.len);
			const out = new Uint8Array(b.length - (end - at));
			out.set(b.subarray(0, at));
			out.set(b.subarray(end), at);
			b = out;
		}
	}
	return b;
}

/** Numbers that break naive parsers, as text. */
export const nastyNumber = fc.constantFrom(
	'NaN', 'Infinity', '-Infinity', '1e309', '-1e309', '1e-400', '9'.repeat(400), '0x1F', '1,5', '١٢٣', '', ' ', '-', '.', '1e', '--1', '+0', '-0', '4.9e-324', '1.7976931348623157e308'
);

/** Text-level damage to a delimited log: duplicate/delete rows and columns, change delimiter,
 * replace a cell with a nasty number, swap two cells (wrong coordinate order). */
export type TextMutation =
	| { op: 'dupRow' | 'delRow'; row: number }
	| { op: 'dupCol' | 'delCol'; col: number }
	| { op: 'delimiter'; to: string }
	| { op: 'cell'; row: number; col: number; value: string }
	| { op: 'swapCols'; a: number; b: number }
	| { op: 'newline'; to: string };

export const textMutation: fc.Arbitrary<TextMutation> = fc.oneof(
	fc.record({ op: fc.constantFrom('dupRow' as const, 'delRow' as const), row: fc.nat() }),
	fc.record({ op: fc.constantFrom('dupCol' as const, 'delCol' as const), col: fc.nat() }),
	fc.record({ op: fc.constant('delimiter' as const), to: fc.constantFrom(';', '\t', '|', ' ', '', ',,', '"') }),
	fc.record({ op: fc.constant('cell' as const), row: fc.nat(), col: fc.nat(), value: fc.oneof(nastyNumber, fc.string({ maxLength: 12 }), fc.constantFrom('"', '"a""b', '\r', '\n', '"\n"')) }),
	fc.record({ op: fc.constant('swapCols' as const), a: fc.nat(), b: fc.nat() }),
	fc.record({ op: fc.constant('newline' as const), to: fc.constantFrom('\r\n', '\r', '\n\n') })
);

export function mutateTable(text: string, mutations: TextMutation[]): string {
	let rows = text.split('\n').map((l) => l.split(','));
	let delimiter = ',';
	let newline = '\n';
	for (const m of mutations) {
		if (!rows.length) break;
		if (m.op === 'dupRow') rows.splice(m.row % rows.length, 0, [...rows[m.row % rows.length]]);
		else if (m.op === 'delRow') rows.splice(m.row % rows.length, 1);
		else if (m.op === 'dupCol') rows = rows.map((r) => (r.length ? [...r.slice(0, m.col % r.length + 1), r[m.col % r.length], ...r.slice(m.col % r.length + 1)] : r));
		else if (m.op === 'delCol') rows = rows.map((r) => r.filter((_, i) => i !== m.col % Math.max(1, r.length)));
		else if (m.op === 'delimiter') delimiter = m.to;
		else if (m.op === 'newline') newline = m.to;
		else if (m.op === 'cell') {
			const r = rows[m.row % rows.length];
			if (r.length) r[m.col % r.length] = m.value;
		} else if (m.op === 'swapCols') rows = rows.map((r) => {
			if (!r.length) return r;
			const out = [...r];
			const a = m.a % r.length, b = m.b % r.length;
			[out[a], out[b]] = [out[b], out[a]];
			return out;
		});
	}
	return rows.map((r) => r.join(delimiter)).join(newline);
}

export const bytesOf = (s: string) => enc.encode(s);
export const textOf = (b: Uint8Array) => dec.decode(b);
