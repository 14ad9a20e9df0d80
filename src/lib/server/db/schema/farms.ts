import { doublePrecision, index, pgEnum, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';

export const farms = pgTable('farms', {
	id: uuid().primaryKey().defaultRandom(),
	slug: text().notNull().unique(),
	name: text().notNull(),
	/** IANA zone: an application is one field on one local day. */
	timeZone: text().notNull().default('UTC'),
	/** ISO 4217 code of the prices entered in the catalogue. */
	currency: text().notNull().default('USD'),
	/** A cell is a hotspot at or above this treated share (percent), with at least half of it
	 * covered. Set by agronomists and managers; 20 % is a starting point (common practice, no source). */
	hotspotThresholdPercent: doublePrecision().notNull().default(20),
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});
export type Farm = typeof farms.$inferSelect;

export const roles = ['manager', 'agronomist', 'operator', 'landlord'] as const;
export type Role = (typeof roles)[number];
export const role = pgEnum('role', roles);

/** A role belongs to a person in one farm: the same person may be a landlord elsewhere. */
export const memberships = pgTable(
	'memberships',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		role: role().notNull(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [unique().on(t.farmId, t.userId), index().on(t.userId)]
);
export type Membership = typeof memberships.$inferSelect;
