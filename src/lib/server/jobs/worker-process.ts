// The app keeps one worker process running beside it (set PATCHBOOK_WORKER=off to run workers
// separately). A worker that dies is started again, with a growing pause if it keeps dying.
import { fork, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';

let child: ChildProcess | null = null;
let stopping = false;
let restarts = 0;

function command(): { script: string; execArgv: string[] } | null {
	// Built app: build/worker.js beside build/index.js; `node build` names the folder, `node
	// build/index.js` the file. Dev server: the TypeScript source via tsx.
	const entry = process.argv[1] ?? '';
	for (const built of [join(entry, 'worker.js'), join(dirname(entry), 'worker.js')]) {
		if (existsSync(built)) return { script: built, execArgv: [] };
	}
	const source = join(process.cwd(), 'src/lib/server/jobs/worker-main.ts');
	if (existsSync(source)) return { script: source, execArgv: ['--import', 'tsx'] };
	return null;
}

export function startWorker(env: Record<string, string | undefined>): void {
	if (child || stopping || env.PATCHBOOK_WORKER === 'off') return;
	const cmd = command();
	if (!cmd) {
		console.error('[app] no worker script found; uploads will wait in the queue');
		return;
	}
	child = fork(cmd.script, [], {
		execArgv: cmd.execArgv,
		env: { ...process.env, ...env, PATCHBOOK_WORKER_SOLE: '1' },
		stdio: 'inherit'
	});
	child.on('exit', (code, signal) => {
		child = null;
		if (stopping) return;
		restarts += 1;
		const pauseMs = Math.min(30_000, 500 * 2 ** Math.min(restarts, 6));
		console.error(`[app] worker exited (${signal ?? code}); starting another in ${pauseMs} ms`);
		setTimeout(() => startWorker(env), pauseMs).unref();
	});
}

export function stopWorker(): void {
	stopping = true;
	child?.kill('SIGTERM');
}
