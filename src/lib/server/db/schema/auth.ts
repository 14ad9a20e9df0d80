import { boolean, index, integer, pgEnum, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

export const unitSystem = pgEnum('unit_system', ['metric', 'us']);

// Lucia expects text ids on users and sessions.
export const users = pgTable('users', {
	id: text().primaryKey(),
	email: text().notNull().unique(), // stored lower-case
	name: text().notNull(),
	passwordHash: text().notNull(),
	units: unitSystem().notNull().default('metric'),
	lastFarmId: text(),
	/** Mail when an upload of this person's, or (for managers) of their farm's, is processed or fails. */
	notifyUploads: boolean().notNull().default(true),
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});
export type User = typeof users.$inferSelect;

export const sessions = pgTable(
	'sessions',
	{
		id: text().primaryKey(),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		expiresAt: timestamp({ withTimezone: true }).notNull()
	},
	(t) => [index().on(t.userId)]
);

/** Failed sign-ins counted per key ("account:<email>" or "address:<ip>") in a fixed window. */
export const signInFailures = pgTable('sign_in_failures', {
	key: text().primaryKey(),
	count: integer().notNull().default(0),
	windowStartedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});
