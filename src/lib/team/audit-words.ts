// The farm's audit log as people read it: one sentence per entry, and the kinds of action a
// manager can filter by. Pure; names the actor and what the entry is about from the entry alone
// (the detail each writer stores), so a deleted field or person still reads right. Unknown
// actions are shown as they are stored, never hidden.
import type { Role } from '$lib/server/db/schema/farms';
import { roleNames } from './roles';

export type AuditEntry = {
	action: string;
	actorName: string | null;
	targetType: string | null;
	targetId: string | null;
	detail: Record<string, unknown> | null;
};

/** Filterable kinds: each matches actions by SQL LIKE patterns. */
export const auditKinds = {
	team: { label: 'Team changes', patterns: ['membership.%'] },
	invitations: { label: 'Invitations', patterns: ['member.invited', 'invitation.%'] },
	grants: { label: 'Landlord grants', patterns: ['grant.%', 'landlord_grant.%', 'landlord.%'] },
	deletions: { label: 'Deletions and removals', patterns: ['%.deleted', '%.removed', '%.revoked'] },
	fields: { label: 'Fields', patterns: ['field.%'] },
	zones: { label: 'Zones', patterns: ['zone.%'] },
	notes: { label: 'Notes', patterns: ['note.%'] },
	records: { label: 'Record sign-offs', patterns: ['record.%'] },
	catalogue: { label: 'Catalogue', patterns: ['machine.%', 'product.%', 'tank_mix.%'] },
	settings: { label: 'Farm settings', patterns: ['farm.%'] }
} as const;
export type AuditKind = keyof typeof auditKinds;
export const isAuditKind = (v: string): v is AuditKind => v in auditKinds;

const str = (v: unknown): string | null => (typeof v === 'string' && v.trim() ? v : typeof v === 'number' ? String(v) : null);
const quoted = (v: unknown, fallback: string) => (str(v) ? `“${str(v)}”` : fallback);
const role = (v: unknown) => (typeof v === 'string' && v in roleNames ? roleNames[v as Role].toLowerCase() : str(v) ?? 'an unknown role');
const short = (v: unknown, max = 80) => {
	const s = str(v);
	if (!s) return null;
	return s.length > max ? `${s.slice(0, max - 1)}…` : s;
};
const obj = (v: unknown): Record<string, unknown> => (v && typeof v === 'object' ? (v as Record<string, unknown>) : {});

/** The object of a catalogue entry: its name when stored, else its kind. */
function named(d: Record<string, unknown>, kind: string) {
	const n = str(d.name) ?? str(obj(d.after).name) ?? str(obj(d.before).name);
	return n ? `${kind} “${n}”` : `a ${kind}`;
}

/** "Mara Quill changed Sam Reed’s role from operator to agronomist." */
export function auditSentence(e: AuditEntry): string {
	const who = e.actorName ?? 'Someone (account since deleted)';
	const d = e.detail ?? {};
	const [domain, verb] = e.action.split('.', 2);
	switch (e.action) {
		case 'membership.role_changed':
			return `${who} changed ${str(d.name) ?? 'a member'}’s role from ${role(d.from)} to ${role(d.to)}.`;
		case 'membership.removed': {
			const grants = Array.isArray(d.grantsRemoved) ? d.grantsRemoved.length : 0;
			return `${who} removed ${str(d.name) ?? 'a member'} (${role(d.from)}) from the farm${grants ? ` and ended their access to ${grants} granted field${grants === 1 ? '' : 's'}` : ''}.`;
		}
		case 'member.invited':
			return `${who} invited ${str(d.email) ?? 'someone'} as ${role(d.role)}.`;
		case 'invitation.resent':
			return `${who} sent ${str(d.email) ?? 'someone'} a new invitation link (${role(d.role)}); the earlier link no longer works.`;
		case 'invitation.revoked':
			return `${who} withdrew the invitation of ${str(d.email) ?? 'someone'} (${role(d.role)}).`;
		case 'invitation.accepted':
			return `${who} accepted the invitation and joined as ${role(d.role)}${d.account === 'new' ? ' with a new account' : d.alreadyMember ? ' (was a member already)' : ''}.`;
		case 'field.created':
			return `${who} added field ${quoted(d.name, 'a field')}.`;
		case 'field.renamed':
			return `${who} renamed field ${quoted(d.from, '')} to ${quoted(d.to, 'a new name')}.`;
		case 'field.boundary_edited':
			return `${who} changed a field’s boundary.`;
		case 'field.deleted':
			return `${who} deleted field ${quoted(d.name, '(name not kept)')} with its applications.`;
		case 'zone.created':
			return `${who} made zone ${quoted(d.name, 'a zone')}.`;
		case 'zone.edited': {
			const rename = obj(d.name);
			return rename.to ? `${who} renamed zone ${quoted(rename.from, '')} to ${quoted(rename.to, '')}.` : `${who} changed a zone’s description or target rate.`;
		}
		case 'zone.reshaped':
			return `${who} redrew a zone.`;
		case 'zone.deleted':
			return `${who} deleted zone ${quoted(d.name, '(name not kept)')}.`;
		case 'note.created':
			return `${who} added a note${obj(d.zone).name ? ` pinned to zone ${quoted(obj(d.zone).name, '')}` : ''}.`;
		case 'note.edited':
			return `${who} edited a note${short(obj(d.body).to) ? `: now “${short(obj(d.body).to)}”` : ''}.`;
		case 'note.deleted':
			return `${who} deleted a note${short(d.body) ? `: “${short(d.body)}”` : ''}.`;
		case 'record.signed':
			return `${who} signed the application record of ${str(d.field) ?? 'a field'}${str(d.day) ? ` on ${str(d.day)}` : ''}.`;
		case 'record.amended':
			return `${who} amended a signed application record${short(d.reason) ? `: “${short(d.reason)}”` : ''}.`;
		case 'farm.hotspot_threshold_set':
			return `${who} set the hotspot threshold from ${str(d.from) ?? '?'} % to ${str(d.to) ?? '?'} %.`;
	}
	if (domain === 'machine' || domain === 'product' || domain === 'tank_mix') {
		const kind = domain === 'tank_mix' ? 'tank mix' : domain;
		const words: Record<string, string> = { created: 'added', updated: 'changed', deleted: 'deleted' };
		if (verb in words) return `${who} ${words[verb]} ${named(d, kind)} in the catalogue.`;
	}
	if (domain === 'grant' || domain === 'landlord_grant' || domain === 'landlord') {
		const whom = str(d.name) ?? str(d.landlord) ?? str(d.email) ?? 'a landlord';
		const field = str(d.field) ?? str(d.fieldName);
		const on = field ? ` to field “${field}”` : '';
		if (/created|added|granted/.test(verb ?? '')) return `${who} gave ${whom} access${on}.`;
		if (/deleted|removed|revoked/.test(verb ?? '')) return `${who} ended ${whom}’s access${on}.`;
		if (/updated|changed|share/.test(verb ?? '')) return `${who} changed ${whom}’s grant${on}.`;
	}
	// Unknown: the stored action as it is, so nothing is hidden.
	return `${who}: ${e.action}${e.targetType ? ` (${e.targetType})` : ''}.`;
}
