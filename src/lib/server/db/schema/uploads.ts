import { bigint, date, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { machines, tankMixes } from './catalogue';
import { farms } from './farms';

/** Every raw upload, kept by the SHA-256 of its bytes; the bytes live in the raw store. */
export const rawFiles = pgTable('raw_files', {
	sha256: text().primaryKey(),
	sizeBytes: bigint({ mode: 'number' }).notNull(),
	storedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});

export const uploadStatus = pgEnum('upload_status', ['mapping', 'queued', 'processing', 'done', 'failed']);
export const logFormat = pgEnum('log_format', ['csv', 'geojson', 'shapefile']);

export const uploads = pgTable(
	'uploads',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		uploadedBy: text().references(() => users.id, { onDelete: 'set null' }),
		fileName: text().notNull(),
		sha256: text()
			.notNull()
			.references(() => rawFiles.sha256),
		sizeBytes: bigint({ mode: 'number' }).notNull(),
		format: logFormat().notNull(),
		status: uploadStatus().notNull().default('mapping'),
		machineId: uuid().references(() => machines.id, { onDelete: 'set null' }),
		tankMixId: uuid().references(() => tankMixes.id, { onDelete: 'set null' }),
		/** The ColumnMapping applied (src/lib/ingest/mapping.ts). */
		mapping: jsonb().$type<Record<string, unknown>>(),
		/** Only fixes on these local days are used; null = every day in the log. */
		onlyDays: date({ mode: 'string' }).array(),
		progress: doublePrecision().notNull().default(0),
		/** A sentence safe to show; the raw error goes to the server log only. */
		error: text(),
		/** Where the error is: { file, row, column }. */
		errorAt: jsonb().$type<{ file?: string; row?: number; column?: string }>(),
		/** Cleaning and splitting counts: CleaningReport plus outsideFields and per-field counts. */
		report: jsonb().$type<Record<string, unknown>>(),
		fixesTotal: integer(),
		fixesUsed: integer(),
		fixesOutside: integer(),
		attempts: integer().notNull().default(0),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		processedAt: timestamp({ withTimezone: true })
	},
	// The same bytes uploaded twice to one farm are one upload.
	(t) => [unique().on(t.farmId, t.sha256), index().on(t.farmId, t.createdAt)]
);
export type Upload = typeof uploads.$inferSelect;

/** The mapping last used for a header layout, so the next file like it maps itself. */
export const columnMappings = pgTable(
	'column_mappings',
	{
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		/** Normalised header list joined, hashed. */
		signature: text().notNull(),
		mapping: jsonb().$type<Record<string, unknown>>().notNull(),
		updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [unique().on(t.farmId, t.signature)]
);
