// Loads the invented demo farm (sample-data/demo/manifest.json) through the product's own paths:
// boundaries through the boundary reader and field creation, the catalogue through its data
// functions, and every log stored raw, uploaded, mapped and processed by the worker's code.
// Once: a database that already has the demo farm is left alone. Run by npm start and the e2e
// server; `npx tsx scripts/load-demo.ts` by hand.
import { execFileSync } from 'node:child_process';
import { createReadStream, existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { eq } from 'drizzle-orm';
import type { MultiPolygon, Polygon } from 'geojson';
import { parseBoundaryFile } from '$lib/ingest/boundaries';
import type { ColumnMapping } from '$lib/ingest/mapping';
import type { Actor } from '$lib/server/auth/guard';
import { hashPassword } from '$lib/server/auth/password';
import * as catalogue from '$lib/server/catalogue';
import { client, db } from '$lib/server/db';
import { farms, landlordGrants, memberships, uploads as uploadRows, users, type Role } from '$lib/server/db/schema';
import * as fields from '$lib/server/fields';
import { processUploadJob } from '$lib/server/ingest/process-upload';
import * as rawStore from '$lib/server/storage/raw-store';
import * as uploads from '$lib/server/uploads';

type Manifest = {
	password: string;
	users: { email: string; name: string; units: 'metric' | 'us' }[];
	farms: {
		slug: string;
		name: string;
		timeZone: string;
		currency: string;
		boundaries: string;
		nameAttribute: string;
		cellSizeM: number;
		members: { email: string; role: Role }[];
		grants: { email: string; fields: string[]; cropSharePercent: number | null }[];
		catalogue: {
			machines: catalogue.MachineInput[];
			products: catalogue.ProductInput[];
			tankMixes: { name: string; carrierRateLPerM2: number; notes?: string | null; products: { name: string; ratePerM2: number }[] }[];
		};
		logs: { file: string; day: string; uploadedBy: string; machine: string; tankMix: string; mapping: ColumnMapping }[];
	}[];
};

const root = resolve(import.meta.dirname, '..');
const manifest = JSON.parse(readFileSync(join(root, 'sample-data/demo/manifest.json'), 'utf8')) as Manifest;
const logsDir = resolve(process.env.PATCHBOOK_DATA_DIR ?? join(root, '.data'), 'demo-logs');

function must<T>(outcome: catalogue.Outcome<T>, what: string): T {
	if (!outcome.ok) throw new Error(`demo: ${what}: ${outcome.message}`);
	return outcome.value;
}

async function main() {
	const present = await db.select({ id: farms.id }).from(farms).where(eq(farms.slug, manifest.farms[0].slug));
	if (present.length > 0) {
		console.log('demo: the demo farm is already loaded');
		return;
	}
	const t0 = performance.now();
	const wanted = manifest.farms.flatMap((f) => f.logs.map((l) => l.file));
	if (wanted.some((file) => !existsSync(join(logsDir, file)))) {
		console.log(`demo: writing the demo logs to ${logsDir} (deterministic)…`);
		execFileSync('npx', ['tsx', 'scripts/sample-data/generate.ts', '--logs', logsDir], { cwd: root, stdio: 'inherit' });
	}

	const passwordHash = await hashPassword(manifest.password);
	const people = new Map<string, { id: string; email: string; name: string; units: 'metric' | 'us' }>();
	for (const u of manifest.users) {
		const [row] = await db
			.insert(users)
			.values({ id: `u-${u.email.split('@')[0].replace(/[^a-z0-9]+/gi, '-')}`, email: u.email, name: u.name, units: u.units, passwordHash })
			.onConflictDoNothing()
			.returning();
		if (row) people.set(u.email, { id: row.id, email: row.email, name: row.name, units: row.units });
		else {
			const [existing] = await db.select().from(users).where(eq(users.email, u.email));
			people.set(u.email, { id: existing.id, email: existing.email, name: existing.name, units: existing.units });
		}
	}
	const person = (email: string) => {
		const p = people.get(email);
		if (!p) throw new Error(`demo: ${email} is not among the manifest's users`);
		return p;
	};

	const total = manifest.farms.reduce((n, f) => n + f.logs.length, 0);
	let done = 0;
	for (const f of manifest.farms) {
		const [farm] = await db.insert(farms).values({ slug: f.slug, name: f.name, timeZone: f.timeZone, currency: f.currency }).returning();
		await db.insert(memberships).values(f.members.map((m) => ({ farmId: farm.id, userId: person(m.email).id, role: m.role })));
		const farmRef = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
		const manager = f.members.find((m) => m.role === 'manager')!;
		const actor: Actor = { user: person(manager.email), farm: farmRef, role: 'manager' };

		// Boundaries: the file a manager would import, read by the same reader.
		const boundaryFile = join(root, 'sample-data', f.boundaries);
		const parsed = parseBoundaryFile(boundaryFile.split('/').pop()!, new Uint8Array(readFileSync(boundaryFile)));
		if (!parsed.ok) throw new Error(`demo: ${f.boundaries}: ${parsed.error}`);
		const created = await fields.createMany(
			actor,
			parsed.features.map((feature) => ({
				name: String(feature.properties[f.nameAttribute] ?? feature.name),
				boundary: feature.geometry as Polygon | MultiPolygon,
				cellSizeM: f.cellSizeM
			})),
			{ via: 'import', file: f.boundaries }
		);
		if ('problems' in created) throw new Error(`demo: fields of ${f.slug}: ${JSON.stringify(created.problems)}`);
		const farmFields = await fields.list(actor);
		for (const g of f.grants) {
			for (const name of g.fields) {
				const field = farmFields.find((x) => x.name === name);
				if (!field) throw new Error(`demo: grant names an unknown field ${name}`);
				await db.insert(landlordGrants).values({ farmId: farm.id, userId: person(g.email).id, fieldId: field.id, cropSharePercent: g.cropSharePercent });
			}
		}

		const machineIds = new Map<string, string>();
		for (const m of f.catalogue.machines) machineIds.set(m.name, must(await catalogue.createMachine(actor, m), m.name).id);
		const productIds = new Map<string, string>();
		for (const p of f.catalogue.products) productIds.set(p.name, must(await catalogue.createProduct(actor, p), p.name).id);
		const mixIds = new Map<string, string>();
		for (const t of f.catalogue.tankMixes) {
			const mix = must(
				await catalogue.createTankMix(actor, {
					name: t.name,
					carrierRateLPerM2: t.carrierRateLPerM2,
					notes: t.notes ?? null,
					products: t.products.map((p) => ({ productId: productIds.get(p.name)!, ratePerM2: p.ratePerM2 }))
				}),
				t.name
			);
			mixIds.set(t.name, mix.id);
		}

		// Logs: stored raw, uploaded by their operator, mapped, processed by the worker's code.
		// No upload mail: this replays past seasons, and 36 messages per first start would bury
		// the mail people do want to see in the development outbox (invitations, resets, new uploads).
		for (const log of f.logs) {
			const uploader: Actor = { user: person(log.uploadedBy), farm: farmRef, role: 'operator' };
			const format = uploads.formatOf(log.file);
			if (!format) throw new Error(`demo: ${log.file} is not a log format`);
			const stored = await rawStore.put(createReadStream(join(logsDir, log.file)), 2e9);
			const { upload } = await uploads.create(uploader, { fileName: log.file, format, ...stored });
			await uploads.setChoices(uploader, upload.id, {
				mapping: log.mapping as unknown as Record<string, unknown>,
				machineId: machineIds.get(log.machine)!,
				tankMixId: mixIds.get(log.tankMix)!,
				onlyDays: null
			});
			await processUploadJob(db, upload.id, { attemptsLeft: 0, notify: false });
			const [after] = await db.select().from(uploadRows).where(eq(uploadRows.id, upload.id));
			if (after.status !== 'done') throw new Error(`demo: ${log.file} failed: ${after.error}`);
			done += 1;
			console.log(`demo: [${done}/${total}] ${f.slug} ${log.file}: ${after.fixesUsed?.toLocaleString()} fixes used`);
		}
	}
	console.log(`demo: loaded in ${((performance.now() - t0) / 1000).toFixed(0)} s`);
}

main()
	.then(() => client.end())
	.catch(async (e) => {
		console.error(e instanceof Error ? e.message : e);
		await client.end();
		process.exit(1);
	});
