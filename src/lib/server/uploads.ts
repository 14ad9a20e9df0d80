import { createHash } from 'node:crypto';
import { and, desc, eq, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import {
	applicationFixes,
	applications,
	columnMappings,
	fields,
	machines,
	rawFiles,
	tankMixes,
	uploads,
	users,
	type Upload
} from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';

export type LogFormat = Upload['format'];

/** The reader for a file name, or null when Patchbook does not read that kind of file. */
export function formatOf(fileName: string): LogFormat | null {
	const ext = fileName.toLowerCase().split('.').pop();
	if (ext === 'csv' || ext === 'txt' || ext === 'tsv') return 'csv';
	if (ext === 'geojson' || ext === 'json') return 'geojson';
	if (ext === 'zip') return 'shapefile';
	return null;
}

/**
 * Records an upload whose bytes are already in the raw store. The same bytes uploaded to the
 * same farm again are recognised: the earlier upload is returned and nothing is counted twice.
 */
export async function create(
	actor: Actor,
	file: { fileName: string; sha256: string; sizeBytes: number; format: LogFormat }
): Promise<{ upload: Upload; duplicate: boolean }> {
	return db.transaction(async (tx) => {
		await tx.insert(rawFiles).values({ sha256: file.sha256, sizeBytes: file.sizeBytes }).onConflictDoNothing();
		const [inserted] = await tx
			.insert(uploads)
			.values({ farmId: actor.farm.id, uploadedBy: actor.user.id, ...file })
			.onConflictDoNothing({ target: [uploads.farmId, uploads.sha256] })
			.returning();
		if (inserted) return { upload: inserted, duplicate: false };
		const [existing] = await tx
			.select()
			.from(uploads)
			.where(and(eq(uploads.farmId, actor.farm.id), eq(uploads.sha256, file.sha256)));
		return { upload: existing, duplicate: true };
	});
}

export async function get(actor: Actor, id: string): Promise<Upload | null> {
	const [row] = await db
		.select()
		.from(uploads)
		.where(and(eq(uploads.id, id), eq(uploads.farmId, actor.farm.id)));
	return row ?? null;
}

export function list(actor: Actor, limit = 200) {
	return db
		.select({
			id: uploads.id,
			fileName: uploads.fileName,
			sizeBytes: uploads.sizeBytes,
			format: uploads.format,
			status: uploads.status,
			progress: uploads.progress,
			error: uploads.error,
			fixesTotal: uploads.fixesTotal,
			fixesUsed: uploads.fixesUsed,
			fixesOutside: uploads.fixesOutside,
			report: uploads.report,
			createdAt: uploads.createdAt,
			processedAt: uploads.processedAt,
			uploadedBy: users.name
		})
		.from(uploads)
		.leftJoin(users, eq(users.id, uploads.uploadedBy))
		.where(eq(uploads.farmId, actor.farm.id))
		.orderBy(desc(uploads.createdAt))
		.limit(limit);
}

export async function setChoices(
	actor: Actor,
	id: string,
	choices: { mapping: Record<string, unknown>; machineId: string; tankMixId: string; onlyDays: string[] | null }
): Promise<void> {
	await db
		.update(uploads)
		.set({ ...choices, status: 'queued', progress: 0, error: null, errorAt: null })
		.where(and(eq(uploads.id, id), eq(uploads.farmId, actor.farm.id)));
}

export async function rememberMapping(actor: Actor, signature: string, mapping: Record<string, unknown>) {
	await db
		.insert(columnMappings)
		.values({ farmId: actor.farm.id, signature, mapping })
		.onConflictDoUpdate({
			target: [columnMappings.farmId, columnMappings.signature],
			set: { mapping, updatedAt: sql`now()` }
		});
}

export async function rememberedMapping(actor: Actor, signature: string) {
	const [row] = await db
		.select({ mapping: columnMappings.mapping })
		.from(columnMappings)
		.where(and(eq(columnMappings.farmId, actor.farm.id), eq(columnMappings.signature, signature)));
	return row?.mapping ?? null;
}

/** Machines and tank mixes an upload can be processed with. */
export async function choicesFor(actor: Actor) {
	const [machineRows, mixRows] = await Promise.all([
		db
			.select({ id: machines.id, name: machines.name, nozzleCount: machines.nozzleCount, boomWidthM: machines.boomWidthM })
			.from(machines)
			.where(eq(machines.farmId, actor.farm.id))
			.orderBy(machines.name),
		db
			.select({ id: tankMixes.id, name: tankMixes.name, carrierRateLPerM2: tankMixes.carrierRateLPerM2 })
			.from(tankMixes)
			.where(eq(tankMixes.farmId, actor.farm.id))
			.orderBy(tankMixes.name)
	]);
	return { machines: machineRows, tankMixes: mixRows };
}

/** Same header layout, same signature: the key a remembered mapping is found by. */
export function headerSignature(headers: string[]): string {
	const normal = headers.map((h) => h.trim().toLowerCase()).join('\u001f');
	return createHash('sha256').update(normal).digest('hex').slice(0, 32);
}

/** The applications an upload gave fixes to, with their field and figures. */
export function applicationsOf(actor: Actor, uploadId: string) {
	return db
		.select({
			id: applications.id,
			day: applications.day,
			fieldId: applications.fieldId,
			fieldName: fields.name,
			fieldAreaM2: fields.areaM2,
			fixes: applicationFixes.fixCount,
			coveredM2: applications.coveredM2,
			sprayedM2: applications.sprayedM2,
			volumeL: applications.volumeL
		})
		.from(applicationFixes)
		.innerJoin(applications, eq(applications.id, applicationFixes.applicationId))
		.innerJoin(fields, eq(fields.id, applications.fieldId))
		.where(and(eq(applicationFixes.uploadId, uploadId), eq(applications.farmId, actor.farm.id)))
		.orderBy(applications.day, fields.name);
}
