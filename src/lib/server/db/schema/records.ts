// Application records (issue 8): what the operator completes and signs for each application, the
// amendments made after sign-off, and the application-quality figures computed from the log.
import { doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import type { FlaggedRun, QualitySummary } from '../../../compute/quality';
import type { RecordFacts } from '../../../records/facts';
import { users } from './auth';
import { farms } from './farms';
import { applications } from './results';

export const recordStatus = pgEnum('record_status', ['draft', 'signed']);

/**
 * One per application, made when someone first saves it. The facts (field, times, areas,
 * amounts) come from the application while a draft; at sign-off they are copied into
 * `signedFacts`, so reprocessing a log later cannot change what was signed.
 */
export const applicationRecords = pgTable(
	'application_records',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		// A signed record outlives its application (a log processed again with other days): the
		// law asks for the record to be kept, so the link is cleared, not the row.
		applicationId: uuid()
			.unique()
			.references(() => applications.id, { onDelete: 'set null' }),
		status: recordStatus().notNull().default('draft'),
		applicatorName: text(),
		applicatorCertification: text(),
		/** Names of noncertified applicators working under the certified one (40 CFR 171.303(b)(7)). */
		supervisedApplicators: text(),
		clientName: text(),
		clientAddress: text(),
		/** Legal or written description beyond the field's name and position (county, section...). */
		locationDescription: text(),
		crop: text(),
		targetWeeds: text(),
		windSpeedMPerS: doublePrecision(),
		/** Compass point the wind blows from: N, NNE, ... NNW. */
		windFrom: text(),
		airTemperatureC: doublePrecision(),
		relativeHumidityPercent: doublePrecision(),
		inversionNote: text(),
		notes: text(),
		/** Registration number per product id, as recorded (from the catalogue, or typed). */
		registrationNumbers: jsonb().$type<Record<string, string>>().notNull().default({}),
		signedFacts: jsonb().$type<RecordFacts>(),
		signedBy: text().references(() => users.id, { onDelete: 'set null' }),
		/** Kept as text too: the record must name the signer even if the account is removed. */
		signedByName: text(),
		signedAt: timestamp({ withTimezone: true }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		updatedBy: text().references(() => users.id, { onDelete: 'set null' })
	},
	(t) => [index().on(t.farmId, t.status)]
);
export type ApplicationRecord = typeof applicationRecords.$inferSelect;

/** A change to a signed record: what changed, why, who and when. Never updated or deleted. */
export const recordAmendments = pgTable(
	'record_amendments',
	{
		id: uuid().primaryKey().defaultRandom(),
		recordId: uuid()
			.notNull()
			.references(() => applicationRecords.id, { onDelete: 'cascade' }),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		amendedBy: text().references(() => users.id, { onDelete: 'set null' }),
		amendedByName: text().notNull(),
		amendedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		reason: text().notNull(),
		/** Each changed element with its value before and after, as shown to people. */
		changes: jsonb().$type<{ field: string; label: string; before: string; after: string }[]>().notNull()
	},
	(t) => [index().on(t.recordId, t.amendedAt), index().on(t.farmId)]
);
export type RecordAmendment = typeof recordAmendments.$inferSelect;

/** Application quality from the log, recomputed with the application's coverage. */
export const applicationQuality = pgTable('application_quality', {
	applicationId: uuid()
		.primaryKey()
		.references(() => applications.id, { onDelete: 'cascade' }),
	summary: jsonb().$type<QualitySummary>().notNull(),
	/** Flagged stretches of track, simplified, [lng, lat] rounded to about 1 cm. */
	segments: jsonb().$type<FlaggedRun[]>().notNull(),
	segmentCount: integer().notNull(),
	computedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});
