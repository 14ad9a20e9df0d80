import { customType, date, doublePrecision, index, integer, pgTable, primaryKey, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { machines, tankMixes } from './catalogue';
import { farms } from './farms';
import { fields } from './fields';
import { uploads } from './uploads';

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'bytea' });

/** One field on one local day with one tank mix, from one or more logs. */
export const applications = pgTable(
	'applications',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		fieldId: uuid()
			.notNull()
			.references(() => fields.id, { onDelete: 'cascade' }),
		tankMixId: uuid()
			.notNull()
			.references(() => tankMixes.id, { onDelete: 'restrict' }),
		machineId: uuid().references(() => machines.id, { onDelete: 'set null' }),
		day: date({ mode: 'string' }).notNull(),
		season: integer().notNull(),
		startedAt: timestamp({ withTimezone: true }).notNull(),
		endedAt: timestamp({ withTimezone: true }).notNull(),
		fixCount: integer().notNull(),
		coveredM2: doublePrecision().notNull(),
		sprayedM2: doublePrecision().notNull(),
		volumeL: doublePrecision().notNull(),
		computedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [unique().on(t.fieldId, t.day, t.tankMixId), index().on(t.farmId, t.season), index().on(t.fieldId, t.season)]
);
export type Application = typeof applications.$inferSelect;

/** The cleaned fixes an upload gave an application, packed (see src/lib/server/ingest/pack.ts),
 * so a new grid, a zone drawn later or a fixed catalogue is recomputed without the raw file. */
export const applicationFixes = pgTable(
	'application_fixes',
	{
		applicationId: uuid()
			.notNull()
			.references(() => applications.id, { onDelete: 'cascade' }),
		uploadId: uuid()
			.notNull()
			.references(() => uploads.id, { onDelete: 'cascade' }),
		fixCount: integer().notNull(),
		packed: bytea().notNull()
	},
	(t) => [primaryKey({ columns: [t.applicationId, t.uploadId] }), index().on(t.uploadId)]
);

/** Per application and grid cell; cells are the field's fixed grid (col, row). */
export const cellResults = pgTable(
	'cell_results',
	{
		applicationId: uuid()
			.notNull()
			.references(() => applications.id, { onDelete: 'cascade' }),
		// Denormalised for reading; no foreign key or index of its own: rows go when their
		// application goes, and every read starts from applications. A foreign key and index
		// here doubled the time to write a field's cells.
		fieldId: uuid().notNull(),
		col: integer().notNull(),
		row: integer().notNull(),
		areaM2: doublePrecision().notNull(),
		coveredM2: doublePrecision().notNull(),
		sprayedM2: doublePrecision().notNull(),
		volumeL: doublePrecision().notNull()
	},
	(t) => [primaryKey({ columns: [t.applicationId, t.col, t.row] })]
);
