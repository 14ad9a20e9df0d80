import { index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { farms, role } from './farms';

/**
 * An invitation to join a farm with a role. The token itself goes only into the mail; the row
 * keeps its SHA-256, so a copy of the database opens no farm. Single use: accepting sets used_at
 * in one conditional UPDATE, so two tabs cannot both use it. A resend revokes the row and makes a
 * new one, so the old link is dead.
 */
export const invitations = pgTable(
	'invitations',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		email: text().notNull(), // lower-case
		role: role().notNull(),
		tokenHash: text().notNull().unique(), // hex SHA-256 of the base64url token
		expiresAt: timestamp({ withTimezone: true }).notNull(),
		usedAt: timestamp({ withTimezone: true }),
		revokedAt: timestamp({ withTimezone: true }),
		invitedBy: text().references(() => users.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId, t.email)]
);
export type Invitation = typeof invitations.$inferSelect;
