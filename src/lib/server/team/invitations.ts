// Invitations from a manager's side: invite, resend, revoke, list the pending ones. The caller has
// checked `team.manage`; every query is scoped by the actor's farm (another farm's invitation is
// "not found"). Mail failures never lose an invitation: the result carries the link to pass on.
import { and, asc, eq, gt, isNull, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { auditLog, farms, invitations, memberships, users, type Role } from '$lib/server/db/schema';
import { sendMail, publicOrigin } from '$lib/server/mail/mailer';
import { invitationMail } from '$lib/mail/invitation';
import { roleNames } from '$lib/team/roles';
import { isRole } from './members';
import { hashToken, newToken } from './tokens';
import { problem, type Outcome, type TeamActor } from './outcome';

export const INVITATION_DAYS = 7;

const isUuid = (s: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(s);

export type Delivery = { link: string; mailed: boolean; mailProblem: string | null };

// Deliberately loose: one @, something on each side, a dot in the domain, no spaces. The mail
// server is the real judge; this catches typing slips with a sentence instead of a bounce.
const emailShape = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

export function emailProblem(email: string): string | null {
	if (!email) return 'Enter the e-mail address to invite.';
	if (email.length > 254) return 'That e-mail address is too long (at most 254 characters).';
	if (!emailShape.test(email)) return `“${email}” does not look like an e-mail address (name@example.com).`;
	return null;
}

export type PendingInvitation = {
	id: string;
	email: string;
	role: Role;
	invitedByName: string | null;
	createdAt: Date;
	expiresAt: Date;
	expired: boolean;
};

/** Invitations not used and not revoked, expired ones included (they can be sent again). */
export async function listPending(farmId: string): Promise<PendingInvitation[]> {
	const rows = await db
		.select({
			id: invitations.id,
			email: invitations.email,
			role: invitations.role,
			invitedByName: users.name,
			createdAt: invitations.createdAt,
			expiresAt: invitations.expiresAt,
			expired: sql<boolean>`${invitations.expiresAt} <= now()`
		})
		.from(invitations)
		.leftJoin(users, eq(users.id, invitations.invitedBy))
		.where(and(eq(invitations.farmId, farmId), isNull(invitations.usedAt), isNull(invitations.revokedAt)))
		.orderBy(asc(invitations.email));
	return rows;
}

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

async function insertInvitation(tx: Tx, actor: TeamActor, email: string, role: Role) {
	const token = newToken();
	const [row] = await tx
		.insert(invitations)
		.values({
			farmId: actor.farm.id,
			email,
			role,
			tokenHash: hashToken(token),
			expiresAt: sql`now() + make_interval(days => ${INVITATION_DAYS})`,
			invitedBy: actor.user.id
		})
		.returning();
	return { token, row };
}

async function deliver(actor: TeamActor, token: string, email: string, role: Role, expiresAt: Date, origin?: string): Promise<Delivery> {
	const [farm] = await db.select({ timeZone: farms.timeZone }).from(farms).where(eq(farms.id, actor.farm.id));
	const link = `${publicOrigin(origin)}/invite/${token}`;
	const words = invitationMail({
		farmName: actor.farm.name,
		role,
		inviterName: actor.user.name,
		expiresAt,
		timeZone: farm?.timeZone ?? 'UTC',
		url: link
	});
	const sent = await sendMail({ to: email, subject: words.subject, text: words.text, html: words.html, kind: 'invitation', farmId: actor.farm.id });
	return { link, mailed: sent.ok, mailProblem: sent.ok ? null : sent.reason };
}

/**
 * Invites `email` with `role`. Refuses a person already in the farm and a second pending
 * invitation for the same address (resend that one instead). `origin` is the request's, used for
 * the link only when ORIGIN is not set.
 */
export async function invite(
	actor: TeamActor,
	input: { email: unknown; role: unknown },
	origin?: string
): Promise<Outcome<{ invitationId: string; email: string; role: Role } & Delivery>> {
	const email = String(input.email ?? '').trim().toLowerCase();
	const bad = emailProblem(email);
	if (bad) return problem(400, bad);
	if (!isRole(input.role)) return problem(400, 'Choose the role the person will have: manager, agronomist, operator or landlord.');
	const role = input.role;

	const created = await db.transaction(async (tx) => {
		// One invitation per address at a time; the advisory lock keeps two quick clicks from making two.
		await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`invite:${actor.farm.id}:${email}`}))`);
		const [member] = await tx
			.select({ name: users.name, role: memberships.role })
			.from(memberships)
			.innerJoin(users, eq(users.id, memberships.userId))
			.where(and(eq(memberships.farmId, actor.farm.id), eq(users.email, email)));
		if (member) return problem(409, `${email} is already a member of this farm (${member.name}, ${roleNames[member.role].toLowerCase()}). Change their role in the list instead.`);
		const [pending] = await tx
			.select({ id: invitations.id })
			.from(invitations)
			.where(and(eq(invitations.farmId, actor.farm.id), eq(invitations.email, email), isNull(invitations.usedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, sql`now()`)));
		if (pending) return problem(409, `${email} already has an invitation waiting. Use “Send again” beside it for a new link, or withdraw it first.`);
		const { token, row } = await insertInvitation(tx, actor, email, role);
		await tx.insert(auditLog).values({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'member.invited',
			targetType: 'invitation',
			targetId: row.id,
			detail: { email, role, expiresAt: row.expiresAt.toISOString() }
		});
		return { ok: true as const, token, row };
	});
	if (!created.ok) return created;
	const delivery = await deliver(actor, created.token, email, role, created.row.expiresAt, origin);
	return { ok: true, invitationId: created.row.id, email, role, ...delivery };
}

/** A new link for a pending (or expired) invitation; the old link stops working. */
export async function resend(actor: TeamActor, invitationId: string, origin?: string): Promise<Outcome<{ invitationId: string; email: string; role: Role } & Delivery>> {
	if (!isUuid(invitationId)) return problem(404, 'No such invitation waiting in this farm.');
	const made = await db.transaction(async (tx) => {
		const [old] = await tx
			.update(invitations)
			.set({ revokedAt: sql`now()` })
			.where(and(eq(invitations.id, invitationId), eq(invitations.farmId, actor.farm.id), isNull(invitations.usedAt), isNull(invitations.revokedAt)))
			.returning();
		if (!old) return problem(404, 'No such invitation waiting in this farm: it may have been used or withdrawn meanwhile.');
		const { token, row } = await insertInvitation(tx, actor, old.email, old.role);
		await tx.insert(auditLog).values({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'invitation.resent',
			targetType: 'invitation',
			targetId: row.id,
			detail: { email: old.email, role: old.role, replaces: old.id, expiresAt: row.expiresAt.toISOString() }
		});
		return { ok: true as const, token, row };
	});
	if (!made.ok) return made;
	const delivery = await deliver(actor, made.token, made.row.email, made.row.role, made.row.expiresAt, origin);
	return { ok: true, invitationId: made.row.id, email: made.row.email, role: made.row.role, ...delivery };
}

export async function revoke(actor: TeamActor, invitationId: string): Promise<Outcome<{ email: string }>> {
	if (!isUuid(invitationId)) return problem(404, 'No such invitation waiting in this farm.');
	return db.transaction(async (tx) => {
		const [row] = await tx
			.update(invitations)
			.set({ revokedAt: sql`now()` })
			.where(and(eq(invitations.id, invitationId), eq(invitations.farmId, actor.farm.id), isNull(invitations.usedAt), isNull(invitations.revokedAt)))
			.returning({ email: invitations.email, role: invitations.role });
		if (!row) return problem(404, 'No such invitation waiting in this farm: it may have been used or withdrawn meanwhile.');
		await tx.insert(auditLog).values({
			farmId: actor.farm.id,
			actorId: actor.user.id,
			action: 'invitation.revoked',
			targetType: 'invitation',
			targetId: invitationId,
			detail: { email: row.email, role: row.role }
		});
		return { ok: true as const, email: row.email };
	});
}
