// Patchbook's invented demo farm, deterministic to the byte.
//   npm run sample-data                    writes the committed set into sample-data/ (boundaries,
//                                          manifest, four short sample logs)
//   npm run sample-data -- --logs <dir>    writes the full three-season logs into <dir>
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { boundaryFiles } from './boundaries';
import { renderLog } from './log-files';
import { buildManifest } from './manifest';
import { fullLogs, sampleLogs, type LogSpec } from './schedule';
import { simulateLog } from './simulate';

export { buildManifest } from './manifest';
export { fullLogs, sampleLogs } from './schedule';

export const SAMPLE_DATA_DIR = resolve(dirname(fileURLToPath(import.meta.url)), '../../sample-data');

export type GeneratedLog = { file: string; farm: string; season: number; fields: string[]; fixes: number; bytes: number };

/** One log's file bytes and its number of fixes. */
export function makeLog(spec: LogSpec): { bytes: Uint8Array; fixes: number } {
	const table = simulateLog(spec);
	return { bytes: renderLog(spec.format, spec.file, table), fixes: table.count };
}

/** Everything committed under sample-data/ (paths relative to it), except fixtures/. */
export function committedFiles(): Record<string, Uint8Array | string> {
	const files: Record<string, Uint8Array | string> = { ...boundaryFiles() };
	for (const spec of sampleLogs()) files[`logs/${spec.file}`] = makeLog(spec).bytes;
	files['demo/manifest.json'] = JSON.stringify(buildManifest(), null, '\t') + '\n';
	return files;
}

export function writeCommittedSet(root = SAMPLE_DATA_DIR): string[] {
	const files = committedFiles();
	for (const [path, data] of Object.entries(files)) {
		mkdirSync(dirname(join(root, path)), { recursive: true });
		writeFileSync(join(root, path), data);
	}
	return Object.keys(files);
}

/** Writes every full-length log of the demo into dir (file names as in the manifest). */
export async function generateDemoLogs(dir: string): Promise<GeneratedLog[]> {
	mkdirSync(dir, { recursive: true });
	const out: GeneratedLog[] = [];
	for (const spec of fullLogs()) {
		const { bytes, fixes } = makeLog(spec);
		writeFileSync(join(dir, spec.file), bytes);
		out.push({ file: spec.file, farm: spec.farm, season: spec.season, fields: spec.jobs.map((j) => j.field), fixes, bytes: bytes.length });
		// Let other work on the event loop breathe between logs.
		await new Promise((r) => setImmediate(r));
	}
	return out;
}

async function main(argv: string[]): Promise<void> {
	const t0 = performance.now();
	const at = argv.indexOf('--logs');
	if (at >= 0) {
		const dir = argv[at + 1];
		if (!dir) throw new Error('--logs needs a directory: npm run sample-data -- --logs <dir>');
		const logs = await generateDemoLogs(resolve(dir));
		const fixes = logs.reduce((s, l) => s + l.fixes, 0);
		const mb = logs.reduce((s, l) => s + l.bytes, 0) / 1e6;
		for (const l of logs) console.log(`${l.file}  ${l.fixes} fixes`);
		console.log(`${logs.length} logs, ${fixes} fixes, ${mb.toFixed(0)} MB in ${resolve(dir)} (${((performance.now() - t0) / 1000).toFixed(1)} s)`);
		return;
	}
	const written = writeCommittedSet();
	for (const f of written) console.log(`sample-data/${f}`);
	console.log(`${written.length} files in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
	main(process.argv.slice(2)).catch((err) => {
		console.error(err instanceof Error ? err.message : err);
		process.exit(1);
	});
}
