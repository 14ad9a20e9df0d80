// Reading the development outbox in tests: the fake SMTP server (scripts/fake-smtp.ts) writes
// each message there a moment after the app hands it over.
import { and, desc, gt, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { devOutbox, type DevMail } from '$lib/server/db/schema';

/** The newest message to `address` received after `since`, waiting up to `timeoutMs` for it. */
export async function waitForMail(address: string, options: { since?: Date; kind?: string; timeoutMs?: number } = {}): Promise<DevMail> {
	const deadline = Date.now() + (options.timeoutMs ?? 10_000);
	for (;;) {
		const [mail] = await db
			.select()
			.from(devOutbox)
			.where(
				and(
					sql`${address.toLowerCase()} = any(${devOutbox.envelopeTo})`,
					options.since ? gt(devOutbox.receivedAt, options.since) : undefined,
					options.kind ? sql`${devOutbox.kind} = ${options.kind}` : undefined
				)
			)
			.orderBy(desc(devOutbox.receivedAt))
			.limit(1);
		if (mail) return mail;
		if (Date.now() > deadline) throw new Error(`No mail to ${address}${options.kind ? ` of kind ${options.kind}` : ''} arrived in the outbox.`);
		await new Promise((r) => setTimeout(r, 100));
	}
}

/** Every link in a message's text part. */
export const linksIn = (text: string | null) => [...(text ?? '').matchAll(/https?:\/\/\S+/g)].map((m) => m[0]);
