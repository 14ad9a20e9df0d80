import { describe, expect, it } from 'vitest';
import { auditSentence, auditKinds } from './audit-words';

const entry = (action: string, detail: Record<string, unknown> | null, actorName: string | null = 'Mara Quill') => ({
	action,
	actorName,
	targetType: null,
	targetId: null,
	detail
});

describe('auditSentence', () => {
	it('reads team changes as sentences with from and to', () => {
		expect(auditSentence(entry('membership.role_changed', { name: 'Sam Reed', from: 'operator', to: 'landlord' }))).toBe(
			'Mara Quill changed Sam Reed’s role from operator to landlord.'
		);
		expect(auditSentence(entry('membership.removed', { name: 'Sam Reed', from: 'landlord', grantsRemoved: ['a', 'b'] }))).toBe(
			'Mara Quill removed Sam Reed (landlord) from the farm and ended their access to 2 granted fields.'
		);
		expect(auditSentence(entry('member.invited', { email: 'ann@x.example', role: 'agronomist' }))).toBe('Mara Quill invited ann@x.example as agronomist.');
	});

	it('names a person whose account is gone', () => {
		expect(auditSentence(entry('invitation.revoked', { email: 'a@b.example', role: 'operator' }, null))).toBe(
			'Someone (account since deleted) withdrew the invitation of a@b.example (operator).'
		);
	});

	it('covers deletions, notes, zones and sign-offs', () => {
		expect(auditSentence(entry('field.deleted', { name: 'North Flat', areaM2: 1 }))).toBe('Mara Quill deleted field “North Flat” with its applications.');
		expect(auditSentence(entry('note.deleted', { body: 'Thistle patch by the gate' }))).toBe('Mara Quill deleted a note: “Thistle patch by the gate”.');
		expect(auditSentence(entry('zone.edited', { name: { from: 'A', to: 'B' } }))).toBe('Mara Quill renamed zone “A” to “B”.');
		expect(auditSentence(entry('record.signed', { field: 'Schoolhouse', day: '2025-06-03' }))).toBe(
			'Mara Quill signed the application record of Schoolhouse on 2025-06-03.'
		);
		expect(auditSentence(entry('tank_mix.updated', { before: { name: 'Fallow mix' }, after: { name: 'Fallow mix 2' } }))).toBe(
			'Mara Quill changed tank mix “Fallow mix 2” in the catalogue.'
		);
	});

	it('shows an unknown action raw rather than hiding it', () => {
		expect(auditSentence({ ...entry('upload.reprocessed', {}), targetType: 'upload' })).toBe('Mara Quill: upload.reprocessed (upload).');
	});

	it('does not break on odd detail', () => {
		expect(auditSentence(entry('membership.role_changed', null))).toBe('Mara Quill changed a member’s role from an unknown role to an unknown role.');
		expect(auditSentence(entry('note.edited', { body: 'not an object' }))).toBe('Mara Quill edited a note.');
	});
});

describe('auditKinds', () => {
	it('every kind has at least one pattern', () => {
		for (const k of Object.values(auditKinds)) expect(k.patterns.length).toBeGreaterThan(0);
	});
});
