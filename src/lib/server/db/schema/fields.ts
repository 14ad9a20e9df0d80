import type { MultiPolygon, Polygon } from 'geojson';
import { doublePrecision, index, integer, jsonb, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { farms } from './farms';

export const fields = pgTable(
	'fields',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		boundary: jsonb().$type<Polygon | MultiPolygon>().notNull(), // GeoJSON, [lng, lat]
		/** Ellipsoidal (WGS84) area of the boundary. */
		areaM2: doublePrecision().notNull(),
		// The grid is fixed when the field is made, so a cell means the same ground every season
		// even after the boundary is edited.
		gridProj: text().notNull(),
		gridEpsg: integer(),
		gridCellM: doublePrecision().notNull().default(10),
		gridOriginX: doublePrecision().notNull(),
		gridOriginY: doublePrecision().notNull(),
		gridCols: integer().notNull(),
		gridRows: integer().notNull(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId)]
);
export type Field = typeof fields.$inferSelect;

/** A landlord sees a field only through a grant. */
export const landlordGrants = pgTable(
	'landlord_grants',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		fieldId: uuid()
			.notNull()
			.references(() => fields.id, { onDelete: 'cascade' }),
		/** The landlord's share of herbicide cost under a crop-share lease, 0..100; null = cash rent. */
		cropSharePercent: doublePrecision(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [unique().on(t.userId, t.fieldId), index().on(t.farmId), index().on(t.fieldId)]
);
