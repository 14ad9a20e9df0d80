import { db } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';

type Entry = {
	farmId?: string | null;
	actorId?: string | null;
	action: string;
	targetType?: string;
	targetId?: string;
	detail?: Record<string, unknown>;
};

export async function record(entry: Entry): Promise<void> {
	await db.insert(auditLog).values(entry);
}
