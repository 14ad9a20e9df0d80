import { index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';

/**
 * Password reset links sent by mail. Only the SHA-256 of the token is kept: someone who reads
 * this table (a backup, a leaked dump) cannot use a link. A link works once, for an hour.
 */
export const passwordResets = pgTable(
	'password_resets',
	{
		id: uuid().primaryKey().defaultRandom(),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		/** Hex SHA-256 of the token in the link. */
		tokenHash: text().notNull().unique(),
		expiresAt: timestamp({ withTimezone: true }).notNull(),
		usedAt: timestamp({ withTimezone: true }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.userId)]
);
