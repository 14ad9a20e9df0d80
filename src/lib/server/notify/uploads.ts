// Mail when an upload has been processed or has failed: to the person who uploaded it and to
// the farm's managers, each once, unless they switched it off (users.notify_uploads).
// Runs in the worker process: it takes the worker's database handle and imports nothing of
// SvelteKit ($env, $app), only the mailer, which reads process.env.
// Never throws: a mail that cannot be sent is logged, and the job it follows stays done.
import { and, eq, or, sql } from 'drizzle-orm';
import { uploadDoneMail, uploadFailedMail, type UploadNoticeWords, type UploadTotals } from '$lib/mail/upload-notice';
import type { Db } from '$lib/server/db/create';
import { applicationFixes, applications, farms, fields, memberships, uploads, users } from '$lib/server/db/schema';
import { publicOrigin, sendMail } from '$lib/server/mail/mailer';

export type Recipient = { id: string; email: string; name: string; units: 'metric' | 'us'; reason: 'uploader' | 'manager' };

/** The uploader and the farm's managers who want these mails, each once (the uploader's reason wins). */
export async function uploadRecipients(db: Db, farmId: string, uploadedBy: string | null): Promise<Recipient[]> {
	const rows = await db
		.selectDistinct({ id: users.id, email: users.email, name: users.name, units: users.units })
		.from(users)
		.leftJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.farmId, farmId)))
		.where(and(eq(users.notifyUploads, true), or(uploadedBy ? eq(users.id, uploadedBy) : sql`false`, eq(memberships.role, 'manager'))));
	return rows
		.map((r) => ({ ...r, reason: r.id === uploadedBy ? ('uploader' as const) : ('manager' as const) }))
		.sort((a, b) => a.email.localeCompare(b.email));
}

/** Fields, days and area of the applications this upload feeds, as they stand now. */
export async function uploadTotals(db: Db, uploadId: string): Promise<UploadTotals> {
	const rows = await db
		.select({ field: fields.name, day: applications.day, coveredM2: applications.coveredM2, sprayedM2: applications.sprayedM2 })
		.from(applicationFixes)
		.innerJoin(applications, eq(applications.id, applicationFixes.applicationId))
		.innerJoin(fields, eq(fields.id, applications.fieldId))
		.where(eq(applicationFixes.uploadId, uploadId));
	return {
		fields: [...new Set(rows.map((r) => r.field))].sort(),
		days: [...new Set(rows.map((r) => r.day))].sort(),
		coveredM2: rows.reduce((s, r) => s + r.coveredM2, 0),
		sprayedM2: rows.reduce((s, r) => s + r.sprayedM2, 0)
	};
}

/** Sends the 'upload-done' or 'upload-failed' mail for an upload as it is stored now. */
export async function notifyUploadOutcome(db: Db, uploadId: string): Promise<{ sent: number; failed: number }> {
	const result = { sent: 0, failed: 0 };
	try {
		const [upload] = await db
			.select({ id: uploads.id, farmId: uploads.farmId, fileName: uploads.fileName, status: uploads.status, error: uploads.error, uploadedBy: uploads.uploadedBy })
			.from(uploads)
			.where(eq(uploads.id, uploadId));
		if (!upload || (upload.status !== 'done' && upload.status !== 'failed')) return result;
		const [farm] = await db.select({ slug: farms.slug, name: farms.name }).from(farms).where(eq(farms.id, upload.farmId));
		const recipients = await uploadRecipients(db, upload.farmId, upload.uploadedBy);
		if (!farm || recipients.length === 0) return result;
		const totals = upload.status === 'done' ? await uploadTotals(db, upload.id) : null;
		const origin = publicOrigin();
		for (const r of recipients) {
			const words: UploadNoticeWords = {
				name: r.name,
				farmName: farm.name,
				fileName: upload.fileName,
				reason: r.reason,
				url: `${origin}/${farm.slug}/uploads/${upload.id}`,
				settingsUrl: `${origin}/account`,
				units: r.units
			};
			const mail = totals ? uploadDoneMail(words, totals) : uploadFailedMail(words, upload.error ?? 'The log could not be processed.');
			const sent = await sendMail({ to: r.email, kind: totals ? 'upload-done' : 'upload-failed', farmId: upload.farmId, ...mail });
			if (sent.ok) result.sent++;
			else {
				result.failed++;
				console.error(`[notify] upload ${upload.id} to user ${r.id}: ${sent.reason}`);
			}
		}
	} catch (e) {
		console.error(`[notify] upload ${uploadId}: no mail sent`, e);
	}
	return result;
}
