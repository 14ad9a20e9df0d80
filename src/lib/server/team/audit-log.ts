// The farm's audit log for its managers: filtered by kind of action and by person, newest first,
// 50 to a page, and the same filter whole for the CSV. Scoped by farm in every query.
import { and, desc, eq, like, or, sql, type SQL } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { auditLog, users } from '$lib/server/db/schema';
import { auditKinds, auditSentence, isAuditKind, type AuditKind } from '$lib/team/audit-words';

export const AUDIT_PAGE_SIZE = 50;

export type AuditFilter = { kind: AuditKind | null; actorId: string | null; page: number };

/** The filter from the query string; values that name nothing are dropped. */
export function readAuditFilter(params: URLSearchParams): AuditFilter {
	const kind = params.get('kind') ?? '';
	const page = Number(params.get('page') ?? '1');
	return {
		kind: isAuditKind(kind) ? kind : null,
		actorId: params.get('person') || null,
		page: Number.isInteger(page) && page >= 1 && page <= 100_000 ? page : 1
	};
}

function where(farmId: string, f: AuditFilter): SQL | undefined {
	return and(
		eq(auditLog.farmId, farmId),
		f.kind ? or(...auditKinds[f.kind].patterns.map((p) => like(auditLog.action, p))) : undefined,
		f.actorId ? eq(auditLog.actorId, f.actorId) : undefined
	);
}

export type AuditRow = { id: string; at: Date; action: string; actorName: string | null; actorEmail: string | null; sentence: string; detail: Record<string, unknown> | null };

async function rows(farmId: string, f: AuditFilter, limit?: number, offset = 0): Promise<AuditRow[]> {
	const q = db
		.select({
			id: auditLog.id,
			at: auditLog.at,
			action: auditLog.action,
			targetType: auditLog.targetType,
			targetId: auditLog.targetId,
			detail: auditLog.detail,
			actorName: users.name,
			actorEmail: users.email
		})
		.from(auditLog)
		.leftJoin(users, eq(users.id, auditLog.actorId))
		.where(where(farmId, f))
		.orderBy(desc(auditLog.at), desc(auditLog.id))
		.$dynamic();
	const found = await (limit ? q.limit(limit).offset(offset) : q);
	return found.map((r) => ({ id: r.id, at: r.at, action: r.action, actorName: r.actorName, actorEmail: r.actorEmail, detail: r.detail, sentence: auditSentence(r) }));
}

export async function auditPage(farmId: string, f: AuditFilter) {
	const [{ total }] = await db.select({ total: sql<number>`count(*)::int` }).from(auditLog).where(where(farmId, f));
	const pages = Math.max(1, Math.ceil(total / AUDIT_PAGE_SIZE));
	const page = Math.min(f.page, pages);
	return { total, page, pages, entries: await rows(farmId, f, AUDIT_PAGE_SIZE, (page - 1) * AUDIT_PAGE_SIZE) };
}

/** Everyone who appears as the actor of an entry of this farm, for the person filter. */
export function auditPeople(farmId: string) {
	return db
		.selectDistinct({ id: users.id, name: users.name })
		.from(auditLog)
		.innerJoin(users, eq(users.id, auditLog.actorId))
		.where(eq(auditLog.farmId, farmId))
		.orderBy(users.name);
}

/** Every entry of the filter, for the CSV. */
export const auditAll = (farmId: string, f: AuditFilter) => rows(farmId, f);
