import { index, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { farms } from './farms';

export const auditLog = pgTable(
	'audit_log',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid().references(() => farms.id, { onDelete: 'cascade' }),
		actorId: text().references(() => users.id, { onDelete: 'set null' }),
		action: text().notNull(), // e.g. 'sign_in', 'membership.role_changed'
		targetType: text(),
		targetId: text(),
		detail: jsonb().$type<Record<string, unknown>>(),
		at: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId, t.at)]
);
