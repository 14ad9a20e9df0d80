import { index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';

/**
 * What the local fake SMTP server (scripts/fake-smtp.ts) received: the development outbox.
 * Filled only where no real mail server is configured (npm start, the tests); production mail
 * leaves through SMTP_URL and never lands here.
 */
export const devOutbox = pgTable(
	'dev_outbox',
	{
		id: uuid().primaryKey().defaultRandom(),
		receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		/** The SMTP envelope: who the message was handed over for, lower-case. */
		envelopeFrom: text().notNull(),
		envelopeTo: text().array().notNull(),
		messageId: text(),
		subject: text().notNull(),
		/** From the X-Patchbook-Farm header: whose managers may read it in the app. */
		farmId: uuid(),
		/** From the X-Patchbook-Kind header: 'invitation', 'password-reset', 'upload-done', ... */
		kind: text(),
		textBody: text(),
		htmlBody: text(),
		/** The message as it arrived (RFC 5322), for a look at headers and parts. */
		raw: text().notNull()
	},
	(t) => [index().on(t.farmId, t.receivedAt), index().on(t.receivedAt)]
);
export type DevMail = typeof devOutbox.$inferSelect;
