// npm run bench: the engine issue's benchmark, in one run on this machine.
//   1. writes a deterministic 1,000,000-fix log (144 nozzles, 5 Hz, ~250 ha field; scripts/bench.ts)
//   2. parse-only: papaparse streaming over the file, and Patchbook's reader (parse + convert)
//   3. end to end in a separate process, as the worker runs it: read from the raw store, clean,
//      split, footprints, per-cell results written to PostgreSQL in one transaction; its peak RSS
//   4. while (3) runs, the built web server answers a page: latency p50/p95/max
// Figures are printed, never asserted: identical runs vary by about 25% on two shared cores.
import { execFileSync, fork, spawn } from 'node:child_process';
import { createReadStream, existsSync, mkdtempSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import { BENCH_BOOM, BENCH_FIELD, writeBenchCsv } from './bench';

const count = Number(process.env.BENCH_FIXES ?? 1_000_000);
const dir = mkdtempSync(join(tmpdir(), 'pb-bench-'));
const csvPath = join(dir, 'bench-log.csv');
const dbName = 'patchbook_bench';
const db = (...args: string[]) => execFileSync('bash', ['scripts/db.sh', ...args], { encoding: 'utf8' }).trim();

function median(values: number[]) {
	const s = [...values].sort((a, b) => a - b);
	return s[Math.floor(s.length / 2)];
}
function percentile(values: number[], p: number) {
	const s = [...values].sort((a, b) => a - b);
	return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))];
}

async function papaparseOnly(): Promise<number> {
	const t0 = performance.now();
	let rows = 0;
	await new Promise<void>((resolve, reject) => {
		Papa.parse(createReadStream(csvPath), {
			header: false,
			dynamicTyping: false,
			chunk: (r: Papa.ParseResult<string[]>) => {
				rows += r.data.length;
			},
			complete: () => resolve(),
			error: reject
		});
	});
	const s = (performance.now() - t0) / 1000;
	if (rows < count) throw new Error(`papaparse saw ${rows} rows`);
	return count / s;
}

async function main() {
	console.log(`bench: writing a ${count.toLocaleString()}-fix log…`);
	await writeBenchCsv(csvPath, { count });
	const sizeMB = statSync(csvPath).size / 1e6;
	console.log(`bench: ${sizeMB.toFixed(0)} MB at ${csvPath}`);

	const papa = [await papaparseOnly(), await papaparseOnly(), await papaparseOnly()];
	const papaRate = median(papa);
	console.log(`parse only (papaparse, streaming, 3 runs): median ${Math.round(papaRate).toLocaleString()} fixes/s`);

	db('start');
	db('recreate', dbName);
	const url = db('url', dbName);
	execFileSync('node', ['scripts/migrate.js'], { env: { ...process.env, DATABASE_URL: url }, stdio: 'inherit' });
	const env = { ...process.env, DATABASE_URL: url, PATCHBOOK_DATA_DIR: join(dir, 'data') };

	// The web server, without its own worker, to be asked for a page while the job runs.
	let server: ReturnType<typeof spawn> | null = null;
	const port = 4199;
	if (existsSync('build/index.js')) {
		server = spawn('node', ['build'], {
			env: { ...env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: `http://127.0.0.1:${port}`, PATCHBOOK_WORKER: 'off' },
			stdio: 'ignore'
		});
		for (let i = 0; i < 100; i++) {
			try {
				if ((await fetch(`http://127.0.0.1:${port}/api/health`)).ok) break;
			} catch {
				/* not up yet */
			}
			await new Promise((r) => setTimeout(r, 200));
		}
	} else {
		console.log('bench: no build/ (run npm run build first) — page latency is not measured');
	}

	const child = fork('scripts/bench-process.ts', [csvPath, JSON.stringify(BENCH_FIELD), JSON.stringify(BENCH_BOOM)], {
		execArgv: ['--import', 'tsx'],
		env,
		stdio: ['inherit', 'inherit', 'inherit', 'ipc']
	});
	const latencies: number[] = [];
	let running = true;
	const prober = (async () => {
		if (!server) return;
		while (running) {
			const t0 = performance.now();
			// The sign-in page: rendered by SvelteKit on every request, no cache.
			const r = await fetch(`http://127.0.0.1:${port}/login`);
			await r.text();
			latencies.push(performance.now() - t0);
			await new Promise((r2) => setTimeout(r2, 100));
		}
	})();
	const result = await new Promise<Record<string, number>>((resolve, reject) => {
		child.on('message', (m) => resolve(m as Record<string, number>));
		child.on('exit', (code) => (code ? reject(new Error(`bench process exited ${code}`)) : undefined));
	});
	running = false;
	await prober;
	server?.kill();

	const e2eRate = count / (result.processMs / 1000);
	console.log('');
	console.log('| figure | value |');
	console.log('|---|---|');
	console.log(`| fixes | ${count.toLocaleString()} (${sizeMB.toFixed(0)} MB CSV) |`);
	console.log(`| parse only, papaparse | ${Math.round(papaRate).toLocaleString()} fixes/s |`);
	console.log(`| parse + convert (Patchbook reader) | ${Math.round(count / (result.readMs / 1000)).toLocaleString()} fixes/s |`);
	console.log(`| end to end (read, clean, split, footprints, cells to Postgres) | ${Math.round(e2eRate).toLocaleString()} fixes/s (${(result.processMs / 1000).toFixed(1)} s) |`);
	console.log(`| ratio end to end / parse only | ${(e2eRate / papaRate).toFixed(2)} (target ≥ 0.33) |`);
	console.log(`| peak RSS of the processing process | ${result.maxRssMB.toFixed(0)} MB (target < 1500) |`);
	console.log(`| cells written | ${result.cells.toLocaleString()} |`);
	console.log(`| covered / sprayed | ${(result.coveredM2 / 1e4).toFixed(1)} ha / ${(result.sprayedM2 / 1e4).toFixed(1)} ha |`);
	if (latencies.length) {
		console.log(`| page while processing (${latencies.length} requests) | p50 ${median(latencies).toFixed(0)} ms, p95 ${percentile(latencies, 95).toFixed(0)} ms, max ${Math.max(...latencies).toFixed(0)} ms (target < 200) |`);
	}
}

main().then(
	() => process.exit(0),
	(e) => {
		console.error(e);
		process.exit(1);
	}
);
