// npm run db:backup [-- --out DIR]
// npm run db:restore -- <backup folder> [--db NAME] [--data-dir DIR] [--replace]
// Backup: the app's database (DATABASE_URL, else the project cluster's `patchbook`) with pg_dump
// plus PATCHBOOK_DATA_DIR's raw uploads and photos, into backups/patchbook-<UTC stamp>/.
// Restore: into a new database on the project's cluster (default patchbook_restore_<stamp>) and
// the files into --data-dir (default PATCHBOOK_DATA_DIR or .data). Prints what it did.
import { execFileSync } from 'node:child_process';
import { resolve } from 'node:path';
import { backup, restore } from '../src/lib/server/backup/backup';

const [command, ...rest] = process.argv.slice(2);
const flags = new Map<string, string | true>();
const positional: string[] = [];
for (let i = 0; i < rest.length; i++) {
	const a = rest[i];
	if (a === '--replace') flags.set('replace', true);
	else if (a.startsWith('--')) flags.set(a.slice(2), rest[++i] ?? '');
	else positional.push(a);
}
const dataDir = resolve(String(flags.get('data-dir') ?? process.env.PATCHBOOK_DATA_DIR ?? '.data'));

try {
	if (command === 'backup') {
		const databaseUrl = process.env.DATABASE_URL ?? execFileSync('bash', ['scripts/db.sh', 'url', 'patchbook'], { encoding: 'utf8' }).trim();
		const outDir = resolve(String(flags.get('out') ?? process.env.PATCHBOOK_BACKUP_DIR ?? 'backups'));
		const t0 = Date.now();
		const { path, manifest } = await backup({ databaseUrl, dataDir, outDir });
		const fileBytes = manifest.files.reduce((s, f) => s + f.sizeBytes, 0);
		console.log(
			`backup: database ${manifest.database.name} (${(manifest.database.sizeBytes / 1e6).toFixed(1)} MB dump) and ${manifest.files.length} files (${(fileBytes / 1e6).toFixed(1)} MB) in ${((Date.now() - t0) / 1000).toFixed(1)} s`
		);
		console.log(path);
	} else if (command === 'restore') {
		const path = positional[0];
		if (!path) throw new Error('Say which backup to restore: npm run db:restore -- <backup folder> [--db NAME] [--data-dir DIR] [--replace]');
		const databaseName = String(flags.get('db') ?? `patchbook_restore_${new Date().toISOString().replace(/\D/g, '').slice(0, 14)}`);
		const t0 = Date.now();
		const { databaseUrl, files } = await restore({ path: resolve(path), databaseName, dataDir, replace: flags.get('replace') === true });
		console.log(`restore: database ${databaseName} and ${files} files into ${dataDir} in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
		console.log(`Run the app on it with DATABASE_URL=${databaseUrl} PATCHBOOK_DATA_DIR=${dataDir}`);
	} else {
		throw new Error('usage: tsx scripts/backup.ts backup [--out DIR] | restore <folder> [--db NAME] [--data-dir DIR] [--replace]');
	}
} catch (e) {
	console.error(`${command ?? 'backup'}: ${(e as Error).message}`);
	process.exit(1);
}
