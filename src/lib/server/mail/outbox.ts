// The development outbox as a farm's managers see it: only messages tagged with their farm
// (X-Patchbook-Farm). Mail about no farm (password resets) is not shown to anyone in the app.
import { and, desc, eq } from 'drizzle-orm';
import type { Actor } from '$lib/server/auth/guard';
import { db } from '$lib/server/db';
import { devOutbox } from '$lib/server/db/schema';

export function listForFarm(actor: Actor, limit = 200) {
	return db
		.select({ id: devOutbox.id, to: devOutbox.envelopeTo, subject: devOutbox.subject, kind: devOutbox.kind, receivedAt: devOutbox.receivedAt })
		.from(devOutbox)
		.where(eq(devOutbox.farmId, actor.farm.id))
		.orderBy(desc(devOutbox.receivedAt))
		.limit(limit);
}

export async function getForFarm(actor: Actor, id: string) {
	const [mail] = await db
		.select({
			id: devOutbox.id,
			to: devOutbox.envelopeTo,
			from: devOutbox.envelopeFrom,
			subject: devOutbox.subject,
			kind: devOutbox.kind,
			receivedAt: devOutbox.receivedAt,
			textBody: devOutbox.textBody,
			htmlBody: devOutbox.htmlBody
		})
		.from(devOutbox)
		.where(and(eq(devOutbox.id, id), eq(devOutbox.farmId, actor.farm.id)));
	return mail ?? null;
}
