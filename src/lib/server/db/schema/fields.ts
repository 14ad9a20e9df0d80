import type { MultiPolygon, Polygon } from 'geojson';
import { index, jsonb, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
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
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
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
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [unique().on(t.userId, t.fieldId), index().on(t.farmId), index().on(t.fieldId)]
);
