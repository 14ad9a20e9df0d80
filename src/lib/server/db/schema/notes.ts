import { doublePrecision, index, integer, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { farms } from './farms';
import { fields } from './fields';
import { zones } from './zones';

/**
 * A note pinned to a point of the farm for a season: the team's working notes (agronomists and
 * managers write them; operators read them; landlords never see them).
 */
export const notes = pgTable(
	'notes',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		/** The field the point lay in when the note was pinned; null outside every field (a yard, a gate). */
		fieldId: uuid().references(() => fields.id, { onDelete: 'set null' }),
		/** The zone the note is pinned to, if any; a deleted zone leaves the note on its point. */
		zoneId: uuid().references(() => zones.id, { onDelete: 'set null' }),
		season: integer().notNull(),
		/** WGS84 degrees, the map's [lng, lat] order. */
		lng: doublePrecision().notNull(),
		lat: doublePrecision().notNull(),
		body: text().notNull(),
		/** SHA-256 of the photo's bytes in the photo store (src/lib/server/storage/photo-store.ts). */
		photoSha256: text(),
		/** image/jpeg, image/png or image/webp, from the file's magic bytes, never from the browser. */
		photoType: text(),
		photoBytes: integer(),
		/** A small WebP made from the photo for lists and the map, also in the photo store. */
		thumbSha256: text(),
		authorId: text().references(() => users.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId, t.season), index().on(t.fieldId), index().on(t.authorId)]
);
export type Note = typeof notes.$inferSelect;
