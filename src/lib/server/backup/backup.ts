// Backup and restore of one Patchbook installation: the database as a pg_dump custom-format
// archive, plus the raw uploads and note photos under PATCHBOOK_DATA_DIR, in one timestamped
// folder with a manifest of every file's SHA-256. Used by `npm run db:backup` / `db:restore`
// (scripts/backup.ts) and by backup.test.ts. Imports no SvelteKit modules: it runs from tsx.
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createReadStream, existsSync } from 'node:fs';
import { copyFile, mkdir, readdir, readFile, rename, stat, writeFile } from 'node:fs/promises';
import { dirname, join, relative, resolve } from 'node:path';
import { pipeline } from 'node:stream/promises';

/** The folders of the data dir that hold user data; map tiles and demo logs are rebuilt. */
export const backedUpFolders = ['raw', 'photos'] as const;

export type Manifest = {
	format: 'patchbook-backup-1';
	createdAt: string;
	database: { name: string; file: string; sha256: string; sizeBytes: number };
	files: { path: string; sha256: string; sizeBytes: number }[];
};

const projectRoot = resolve(dirname(new URL(import.meta.url).pathname), '../../../..');

function dbSh(...args: string[]): string {
	return execFileSync('bash', [join(projectRoot, 'scripts/db.sh'), ...args], { encoding: 'utf8', env: process.env }).trim();
}

/** pg_dump and pg_restore of the server's own version (scripts/db.sh bin). */
export function pgBin(tool: 'pg_dump' | 'pg_restore'): string {
	return join(dbSh('bin'), tool);
}

async function sha256Of(path: string): Promise<string> {
	const hash = createHash('sha256');
	await pipeline(createReadStream(path), hash);
	return hash.digest('hex');
}

async function* filesUnder(dir: string): AsyncGenerator<string> {
	if (!existsSync(dir)) return;
	for (const entry of await readdir(dir, { withFileTypes: true })) {
		// tmp/ holds half-written uploads: never part of a backup.
		if (entry.name === 'tmp') continue;
		const path = join(dir, entry.name);
		if (entry.isDirectory()) yield* filesUnder(path);
		else if (entry.isFile()) yield path;
	}
}

function stamp(date: Date): string {
	return date.toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z');
}

/**
 * Writes `<outDir>/patchbook-<UTC stamp>/` with database.dump, files/… and manifest.json, and
 * returns its path. The folder is written under a temporary name and renamed at the end, so a
 * backup cut short never looks complete.
 */
export async function backup(options: { databaseUrl: string; dataDir: string; outDir: string; now?: Date }): Promise<{ path: string; manifest: Manifest }> {
	const createdAt = options.now ?? new Date();
	const name = `patchbook-${stamp(createdAt)}`;
	const final = resolve(options.outDir, name);
	if (existsSync(final)) throw new Error(`${final} exists already; wait a second and back up again.`);
	const work = `${final}.partial`;
	await mkdir(join(work, 'files'), { recursive: true });

	// Custom format: compressed, and pg_restore can restore it into any database name.
	const dumpFile = join(work, 'database.dump');
	execFileSync(pgBin('pg_dump'), ['--format=custom', '--no-owner', '--no-privileges', `--file=${dumpFile}`, `--dbname=${options.databaseUrl}`], {
		stdio: ['ignore', 'inherit', 'inherit']
	});

	const files: Manifest['files'] = [];
	for (const folder of backedUpFolders) {
		const from = resolve(options.dataDir, folder);
		for await (const path of filesUnder(from)) {
			const rel = relative(resolve(options.dataDir), path);
			const to = join(work, 'files', rel);
			await mkdir(dirname(to), { recursive: true });
			await copyFile(path, to);
			files.push({ path: rel, sha256: await sha256Of(to), sizeBytes: (await stat(to)).size });
		}
	}
	const manifest: Manifest = {
		format: 'patchbook-backup-1',
		createdAt: createdAt.toISOString(),
		database: {
			name: new URL(options.databaseUrl).pathname.slice(1),
			file: 'database.dump',
			sha256: await sha256Of(dumpFile),
			sizeBytes: (await stat(dumpFile)).size
		},
		files
	};
	await writeFile(join(work, 'manifest.json'), JSON.stringify(manifest, null, '\t') + '\n');
	await rename(work, final);
	return { path: final, manifest };
}

/** Reads a backup's manifest and checks every file against it before anything is restored. */
export async function verify(path: string): Promise<Manifest> {
	const manifestPath = join(path, 'manifest.json');
	if (!existsSync(manifestPath)) throw new Error(`${path} is not a Patchbook backup: it has no manifest.json.`);
	const manifest = JSON.parse(await readFile(manifestPath, 'utf8')) as Manifest;
	if (manifest.format !== 'patchbook-backup-1') throw new Error(`${manifestPath}: unknown backup format ${JSON.stringify(manifest.format)}.`);
	const check = async (rel: string, sha256: string) => {
		const file = join(path, rel);
		if (!existsSync(file)) throw new Error(`${path}: ${rel} is missing.`);
		if ((await sha256Of(file)) !== sha256) throw new Error(`${path}: ${rel} is damaged (its SHA-256 differs from the manifest's).`);
	};
	await check(manifest.database.file, manifest.database.sha256);
	for (const f of manifest.files) await check(join('files', f.path), f.sha256);
	return manifest;
}

/**
 * Restores a backup into `databaseName` on the project's cluster (created when missing; when it
 * exists it must be empty unless `replace`, which drops it first) and copies the files into
 * `dataDir`. Files are content-addressed, so copying into a data dir in use never overwrites
 * different bytes.
 */
export async function restore(options: { path: string; databaseName: string; dataDir: string; replace?: boolean }): Promise<{ databaseUrl: string; manifest: Manifest; files: number }> {
	if (!/^[A-Za-z0-9_]+$/.test(options.databaseName)) throw new Error(`${options.databaseName}: a database name may hold only letters, digits and _.`);
	const manifest = await verify(options.path);
	const databaseUrl = dbSh('url', options.databaseName);
	if (options.replace) dbSh('recreate', options.databaseName);
	else {
		dbSh('create', options.databaseName);
		const tables = execFileSync(join(dbSh('bin'), 'psql'), [databaseUrl, '-qAtc', "select count(*) from pg_tables where schemaname not in ('pg_catalog', 'information_schema')"], {
			encoding: 'utf8'
		}).trim();
		if (tables !== '0') throw new Error(`The database ${options.databaseName} is not empty (${tables} tables); name a new one, or pass --replace to drop it first.`);
	}
	execFileSync(pgBin('pg_restore'), ['--no-owner', '--no-privileges', '--exit-on-error', '--single-transaction', `--dbname=${databaseUrl}`, join(options.path, manifest.database.file)], {
		stdio: ['ignore', 'inherit', 'inherit']
	});
	for (const f of manifest.files) {
		const to = resolve(options.dataDir, f.path);
		await mkdir(dirname(to), { recursive: true });
		await copyFile(join(options.path, 'files', f.path), to);
	}
	return { databaseUrl, manifest, files: manifest.files.length };
}
