// Processing one as-applied log: read it from the raw store, clean it, split it by field and
// local day, keep the fixes per application, and recompute every application it touches.
// Every write happens in one transaction: a failure leaves the figures as they were.
// Runs in the worker process, so it takes its database handle and imports nothing of SvelteKit.
import { and, eq, sql } from 'drizzle-orm';
import type { MultiPolygon, Polygon } from 'geojson';
import { cleanFixes, selectFixes } from '$lib/compute/clean-fixes';
import { computeCoverage, type CoverageInput } from '$lib/compute/coverage';
import { assessQuality } from '$lib/compute/quality';
import { splitByField } from '$lib/compute/split-by-field';
import type { CleaningReport, FixColumns, GridSpec } from '$lib/compute/types';
import { fieldScaleFactor, projectLngLat, projectRings, utmZoneFor } from '$lib/geo/projection';
import { readLog } from '$lib/ingest/log';
import { formatIssue, type IngestIssue } from '$lib/ingest/issues';
import type { ColumnMapping } from '$lib/ingest/mapping';
import type { Db } from '$lib/server/db/create';
import {
	applicationFixes,
	applicationQuality,
	applications,
	cellResults,
	farms,
	fields,
	machines,
	tankMixes,
	uploads
} from '$lib/server/db/schema';
import { notifyUploadOutcome } from '$lib/server/notify/uploads';
import * as rawStore from '$lib/server/storage/raw-store';
import { concatFixes, packFixes, unpackFixes } from './pack';

/** A problem the uploader can fix; its message is shown as it is. */
export class UploadProblem extends Error {
	constructor(message: string, readonly at: IngestIssue | null = null) {
		super(message);
	}
}

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** A number array as a PostgreSQL array literal: one text parameter, however long. */
function pgArray(values: number[]): string {
	return `{${values.join(',')}}`;
}
type FieldRow = typeof fields.$inferSelect;

/** Local calendar day (YYYY-MM-DD) of each fix in the farm's time zone. */
export function localDays(timeS: Float64Array, timeZone: string): string[] {
	const format = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
	const out: string[] = new Array(timeS.length);
	// Fixes come in runs of the same day: format only when the hour changes.
	let lastHour = NaN;
	let lastDay = '';
	for (let i = 0; i < timeS.length; i++) {
		const hour = Math.floor(timeS[i] / 3600);
		if (hour !== lastHour) {
			lastHour = hour;
			lastDay = format.format(new Date(timeS[i] * 1000));
		}
		out[i] = lastDay;
	}
	return out;
}

function gridOf(f: FieldRow): GridSpec {
	return {
		proj: f.gridProj,
		epsg: f.gridEpsg,
		cellSizeM: f.gridCellM,
		originX: f.gridOriginX,
		originY: f.gridOriginY,
		cols: f.gridCols,
		rows: f.gridRows
	};
}

/** The engine's input for an application's fixes on its field's grid; zones are drawn from the same. */
export function coverageInput(
	field: FieldRow,
	fixes: FixColumns,
	machine: { boomWidthM: number; nozzleCount: number; nozzleSpacingM: number }
): CoverageInput {
	const grid = gridOf(field);
	const boundary = field.boundary as Polygon | MultiPolygon;
	const zone = utmZoneFor(boundary);
	const scaleFactor = zone.proj === grid.proj ? fieldScaleFactor(boundary, zone) : 0.9996;
	const { x, y } = projectLngLat(grid.proj, fixes.lng, fixes.lat);
	let starts: Uint32Array | undefined;
	if (fixes.isStart) {
		const flags = fixes.isStart;
		starts = new Uint32Array(flags.reduce((n, v) => n + v, 0));
		for (let i = 0, j = 0; i < fixes.count; i++) if (flags[i]) starts[j++] = i;
	}
	return { x, y, fixes, starts, boom: machine, scaleFactor, grid };
}

/** Coverage of one application's fixes over its field, per cell and in total. */
export function computeApplication(
	field: FieldRow,
	fixes: FixColumns,
	machine: { boomWidthM: number; nozzleCount: number; nozzleSpacingM: number },
	carrierRateLPerM2: number
) {
	return computeCoverage(coverageInput(field, fixes, machine), projectRings(field.gridProj, field.boundary as Polygon | MultiPolygon), {
		defaultRateLPerM2: carrierRateLPerM2,
		windowToFixes: true
	});
}

async function recomputeApplication(tx: Tx, applicationId: string, field: FieldRow) {
	const [app] = await tx
		.select({ machineId: applications.machineId, tankMixId: applications.tankMixId })
		.from(applications)
		.where(eq(applications.id, applicationId));
	const parts = await tx
		.select({ packed: applicationFixes.packed })
		.from(applicationFixes)
		.where(eq(applicationFixes.applicationId, applicationId));
	if (parts.length === 0) {
		await tx.delete(applications).where(eq(applications.id, applicationId));
		return null;
	}
	const [machine] = await tx.select().from(machines).where(eq(machines.id, app.machineId!));
	const [mix] = await tx.select().from(tankMixes).where(eq(tankMixes.id, app.tankMixId));
	const fixes = concatFixes(parts.map((p) => unpackFixes(p.packed)));
	const { totals, cells } = computeApplication(field, fixes, machine, mix.carrierRateLPerM2);
	if (![totals.coveredM2, totals.sprayedM2, totals.volumeL].every(Number.isFinite)) {
		throw new Error(`coverage of application ${applicationId} is not a number`);
	}

	await tx
		.update(applications)
		.set({
			startedAt: new Date(fixes.timeS[0] * 1000),
			endedAt: new Date(fixes.timeS[fixes.count - 1] * 1000),
			fixCount: fixes.count,
			coveredM2: totals.coveredM2,
			sprayedM2: totals.sprayedM2,
			volumeL: totals.volumeL,
			computedAt: sql`now()`
		})
		.where(eq(applications.id, applicationId));
	// Quality with the machine's limits as they are now; changing them takes a re-process.
	const quality = assessQuality(fixes, machine);
	const qualityRow = { summary: quality.summary, segments: quality.runs, segmentCount: quality.runs.length, computedAt: sql`now()` };
	await tx
		.insert(applicationQuality)
		.values({ applicationId, ...qualityRow })
		.onConflictDoUpdate({ target: applicationQuality.applicationId, set: qualityRow });
	await tx.delete(cellResults).where(eq(cellResults.applicationId, applicationId));
	// One statement per application: columns as arrays, unnested by the server. Row-by-row
	// parameters would take tens of seconds for a field's few hundred thousand cells a season.
	const kept = cells.filter((c) => c.coveredM2 > 0 || c.sprayedM2 > 0 || c.volumeL > 0);
	for (let i = 0; i < kept.length; i += 50_000) {
		const part = kept.slice(i, i + 50_000);
		await tx.execute(sql`
			insert into cell_results (application_id, field_id, col, row, area_m_2, covered_m_2, sprayed_m_2, volume_l)
			select ${applicationId}::uuid, ${field.id}::uuid, c, r, a, cv, sp, v
			from unnest(${pgArray(part.map((c) => c.col))}::int[], ${pgArray(part.map((c) => c.row))}::int[],
				${pgArray(part.map((c) => c.areaM2))}::float8[], ${pgArray(part.map((c) => c.coveredM2))}::float8[],
				${pgArray(part.map((c) => c.sprayedM2))}::float8[], ${pgArray(part.map((c) => c.volumeL))}::float8[])
				as t(c, r, a, cv, sp, v)`);
	}
	return totals;
}

type Progress = (fraction: number) => Promise<void>;

/** Processes an upload whose machine, tank mix and mapping are chosen. Throws UploadProblem. */
export async function processUpload(db: Db, uploadId: string, progress: Progress): Promise<void> {
	const [upload] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
	if (!upload) throw new UploadProblem('This upload no longer exists.');
	if (!upload.mapping || !upload.machineId || !upload.tankMixId) {
		throw new UploadProblem('Choose the column mapping, machine and tank mix before processing.');
	}
	const [farm] = await db.select().from(farms).where(eq(farms.id, upload.farmId));
	const [machine] = await db
		.select()
		.from(machines)
		.where(and(eq(machines.id, upload.machineId), eq(machines.farmId, upload.farmId)));
	const [mix] = await db
		.select()
		.from(tankMixes)
		.where(and(eq(tankMixes.id, upload.tankMixId), eq(tankMixes.farmId, upload.farmId)));
	if (!machine || !mix) throw new UploadProblem('The chosen machine or tank mix has been deleted; choose again.');
	const farmFields = await db.select().from(fields).where(eq(fields.farmId, upload.farmId));
	if (farmFields.length === 0) throw new UploadProblem('This farm has no fields yet: add field boundaries first.');

	// 1. Read: the whole file or nothing.
	const read = await readLog(upload.fileName, rawStore.read(upload.sha256), upload.mapping as unknown as ColumnMapping, {
		nozzleCount: machine.nozzleCount
	});
	if (!read.fixes || read.errors.length > 0) {
		const first = read.errors[0];
		const more = read.errors.length > 1 ? ` (and ${read.errors.length - 1} more problems)` : '';
		throw new UploadProblem(first ? formatIssue(first) + more : `${upload.fileName}: no fixes could be read.`, first ?? null);
	}
	await progress(0.35);

	// 2. Clean, then keep only the chosen days.
	const { fixes: cleaned, report } = cleanFixes(read.fixes);
	const days = localDays(cleaned.timeS, farm.timeZone);
	const wanted = upload.onlyDays ? new Set(upload.onlyDays) : null;

	// 3. Split by field, then by day. Each group also keeps the fix after each of its own, so
	// the interval that carries the boom over the field's edge is drawn (and clipped there).
	const split = splitByField(cleaned.lng, cleaned.lat, cleaned.count, farmFields.map((f) => f.boundary as Polygon | MultiPolygon));
	const groups = new Map<string, { field: FieldRow; day: string; indices: number[]; isStart: number[] }>();
	let notChosenDay = 0;
	split.fixesByField.forEach((indices, fieldIndex) => {
		let g: { field: FieldRow; day: string; indices: number[]; isStart: number[] } | undefined;
		for (const i of indices) {
			if (wanted && !wanted.has(days[i])) {
				notChosenDay++;
				continue;
			}
			const key = `${fieldIndex}|${days[i]}`;
			g = groups.get(key);
			if (!g) groups.set(key, (g = { field: farmFields[fieldIndex], day: days[i], indices: [], isStart: [] }));
			// Field fixes come in ascending order: i may already be there as the previous one's end.
			const last = g.indices.length - 1;
			if (last >= 0 && g.indices[last] === i) g.isStart[last] = 1;
			else {
				g.indices.push(i);
				g.isStart.push(1);
			}
			if (i + 1 < cleaned.count) {
				g.indices.push(i + 1);
				g.isStart.push(0);
			}
		}
	});
	await progress(0.5);

	// 4. One transaction for every write.
	const used = cleaned.count - split.outside - notChosenDay;
	await db.transaction(async (tx) => {
		const previous = await tx
			.delete(applicationFixes)
			.where(eq(applicationFixes.uploadId, upload.id))
			.returning({ applicationId: applicationFixes.applicationId });
		const touched = new Map<string, FieldRow>();
		for (const p of previous) {
			const [app] = await tx.select({ fieldId: applications.fieldId }).from(applications).where(eq(applications.id, p.applicationId));
			if (app) touched.set(p.applicationId, farmFields.find((f) => f.id === app.fieldId)!);
		}
		for (const g of groups.values()) {
			const part = selectFixes(cleaned, Uint32Array.from(g.indices));
			part.isStart = Uint8Array.from(g.isStart);
			const [app] = await tx
				.insert(applications)
				.values({
					farmId: upload.farmId,
					fieldId: g.field.id,
					tankMixId: mix.id,
					machineId: machine.id,
					day: g.day,
					season: Number(g.day.slice(0, 4)),
					startedAt: new Date(part.timeS[0] * 1000),
					endedAt: new Date(part.timeS[part.count - 1] * 1000),
					fixCount: 0,
					coveredM2: 0,
					sprayedM2: 0,
					volumeL: 0
				})
				.onConflictDoUpdate({
					target: [applications.fieldId, applications.day, applications.tankMixId],
					set: { machineId: machine.id }
				})
				.returning({ id: applications.id });
			await tx.insert(applicationFixes).values({ applicationId: app.id, uploadId: upload.id, fixCount: part.count, packed: packFixes(part) });
			touched.set(app.id, g.field);
		}
		let done = 0;
		let gaps = 0;
		let masterOff = 0;
		for (const [applicationId, field] of touched) {
			const totals = await recomputeApplication(tx, applicationId, field);
			gaps += totals?.gaps ?? 0;
			masterOff += totals?.masterOff ?? 0;
			await progress(0.5 + (0.45 * ++done) / touched.size);
		}
		const fullReport: CleaningReport & Record<string, unknown> = {
			...report,
			gaps,
			masterOff,
			outsideFields: split.outside,
			notChosenDay,
			applications: groups.size,
			warnings: read.warnings.slice(0, 20).map(formatIssue),
			warningCount: read.warnings.length
		};
		await tx
			.update(uploads)
			.set({
				status: 'done',
				progress: 1,
				error: null,
				errorAt: null,
				report: fullReport,
				fixesTotal: read.fixes!.count,
				fixesUsed: used,
				fixesOutside: split.outside,
				processedAt: sql`now()`
			})
			.where(eq(uploads.id, upload.id));
	});
}

/**
 * The worker's job: status, progress and a user-safe reason around processUpload. When the
 * upload ends done or failed (not when it goes back to the queue for a retry), the uploader and
 * the farm's managers are mailed, after the job's transaction has committed; `notify: false`
 * skips that (the demo loader replaying old seasons).
 */
export async function processUploadJob(db: Db, uploadId: string, { attemptsLeft, notify = true }: { attemptsLeft: number; notify?: boolean }) {
	await db
		.update(uploads)
		.set({ status: 'processing', progress: 0.02, attempts: sql`${uploads.attempts} + 1` })
		.where(eq(uploads.id, uploadId));
	let last = 0;
	const progress: Progress = async (fraction) => {
		// At most a write a quarter second: progress is for people, not for the log.
		if (Date.now() - last < 250 && fraction < 1) return;
		last = Date.now();
		await db.update(uploads).set({ progress: fraction }).where(eq(uploads.id, uploadId));
	};
	let ended = false;
	try {
		await processUpload(db, uploadId, progress);
		ended = true;
	} catch (e) {
		if (e instanceof UploadProblem) {
			await db
				.update(uploads)
				.set({ status: 'failed', progress: 0, error: e.message, errorAt: e.at ? { file: e.at.file, row: e.at.row ?? undefined, column: e.at.column ?? undefined } : null })
				.where(eq(uploads.id, uploadId));
			ended = true; // the file is wrong: retrying will not help
		} else {
			const id = Math.random().toString(36).slice(2, 10);
			console.error(`[worker error ${id}] upload ${uploadId}`, e);
			await db
				.update(uploads)
				.set({
					status: attemptsLeft > 0 ? 'queued' : 'failed',
					error: attemptsLeft > 0 ? null : `Processing failed on our side (reference ${id}). Try "Process again", or tell us the reference.`
				})
				.where(eq(uploads.id, uploadId));
			if (attemptsLeft > 0) throw e; // pg-boss retries
			ended = true;
		}
	}
	// Outside the try: mail never fails or retries the job (notifyUploadOutcome never throws).
	if (ended && notify) await notifyUploadOutcome(db, uploadId);
}

