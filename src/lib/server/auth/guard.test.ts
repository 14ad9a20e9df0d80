import { describe, expect, test } from 'vitest';
import { eventFor, join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import { may, mayOpen, requireMember, requireRole, requireUser } from './guard';


describe('what each role may open (DESIGN.md roles table)', () => {
	test('only managers open the team and savings', () => {
		expect(mayOpen('manager', 'team')).toBe(true);
		for (const role of ['agronomist', 'operator', 'landlord'] as const) {
			expect(mayOpen(role, 'team')).toBe(false);
			expect(mayOpen(role, 'savings')).toBe(false);
		}
	});
	test('operators see no prices; landlords see only season summaries', () => {
		expect(may('operator', 'prices.view')).toBe(false);
		expect(may('manager', 'prices.view')).toBe(true);
		expect(mayOpen('landlord', 'summaries')).toBe(true);
		for (const area of ['overview', 'map', 'fields', 'uploads', 'records', 'catalogue'] as const) {
			expect(mayOpen('landlord', area)).toBe(false);
		}
	});
});

describe('season summaries and landlord grants', () => {
	test('managers and landlords open summaries; only managers grant fields; cost for managers and landlords only', () => {
		for (const role of ['operator', 'agronomist'] as const) expect(mayOpen(role, 'summaries')).toBe(false);
		expect(may('manager', 'grants.manage')).toBe(true);
		for (const role of ['agronomist', 'operator', 'landlord'] as const) expect(may(role, 'grants.manage')).toBe(false);
		expect(may('landlord', 'summaries.cost')).toBe(true);
		expect(may('manager', 'summaries.cost')).toBe(true);
		expect(may('operator', 'summaries.cost')).toBe(false);
	});
});

describe('notes (the team’s working notes)', () => {
	test('managers and agronomists write notes, operators read them, landlords neither', () => {
		expect(['manager', 'agronomist'].every((r) => may(r as 'manager', 'notes.write'))).toBe(true);
		expect(may('operator', 'notes.write')).toBe(false);
		expect(may('operator', 'notes.view')).toBe(true);
		expect(may('landlord', 'notes.view')).toBe(false);
		expect(may('landlord', 'notes.write')).toBe(false);
	});
	test('only managers change other people’s notes', () => {
		expect(may('manager', 'notes.moderate')).toBe(true);
		for (const role of ['agronomist', 'operator', 'landlord'] as const) expect(may(role, 'notes.moderate')).toBe(false);
	});
});

describe('zones', () => {
	test('managers and agronomists make and change zones; everyone sees them, landlords their granted fields', () => {
		expect(may('manager', 'zones.edit')).toBe(true);
		expect(may('agronomist', 'zones.edit')).toBe(true);
		expect(may('operator', 'zones.edit')).toBe(false);
		expect(may('landlord', 'zones.edit')).toBe(false);
		for (const role of ['manager', 'agronomist', 'operator', 'landlord'] as const) expect(may(role, 'zones.view')).toBe(true);
	});
});

describe('the guard against the database', () => {
	test('no user: a page redirects to sign-in, an API answers 401', async () => {
		expect(() => requireUser(eventFor(null, {}, '/x'))).toThrow();
		expect(await statusOf(requireMember(eventFor(null, { farm: 'any' }), { api: true }))).toBe(401);
		expect(await statusOf(requireMember(eventFor(null, { farm: 'any' })))).toBe(303);
	});

	test('a member gets their role; a non-member of an existing farm gets 404 like a missing farm', async () => {
		const farm = await makeFarm();
		const operator = await makeUser();
		const outsider = await makeUser();
		await join(farm.id, operator.id, 'operator');

		const actor = await requireMember(eventFor(operator, { farm: farm.slug }));
		expect(actor.role).toBe('operator');
		expect(actor.farm.id).toBe(farm.id);
		expect(await statusOf(requireMember(eventFor(outsider, { farm: farm.slug })))).toBe(404);
		expect(await statusOf(requireMember(eventFor(outsider, { farm: 'no-such-farm' })))).toBe(404);
	});

	test('a role outside the allowed list gets 403', async () => {
		const farm = await makeFarm();
		const operator = await makeUser();
		const manager = await makeUser();
		await join(farm.id, operator.id, 'operator');
		await join(farm.id, manager.id, 'manager');
		expect(await statusOf(requireRole(eventFor(operator, { farm: farm.slug }), 'team'))).toBe(403);
		expect(await statusOf(requireRole(eventFor(operator, { farm: farm.slug }), 'team', { api: true }))).toBe(403);
		expect(await statusOf(requireRole(eventFor(manager, { farm: farm.slug }), 'team'))).toBe(200);
		expect(await statusOf(requireRole(eventFor(operator, { farm: farm.slug }), ['manager', 'operator']))).toBe(200);
	});

	test('a role is per farm: the same person can be a manager in one and a landlord in another', async () => {
		const a = await makeFarm();
		const b = await makeFarm();
		const person = await makeUser();
		await join(a.id, person.id, 'manager');
		await join(b.id, person.id, 'landlord');
		expect(await statusOf(requireRole(eventFor(person, { farm: a.slug }), 'team'))).toBe(200);
		expect(await statusOf(requireRole(eventFor(person, { farm: b.slug }), 'team'))).toBe(403);
	});
});

describe('records (issue 8)', () => {
	test('managers, agronomists and operators see and sign records; landlords neither', () => {
		for (const role of ['manager', 'agronomist', 'operator'] as const) {
			expect(may(role, 'records.view')).toBe(true);
			expect(may(role, 'records.sign')).toBe(true);
			expect(mayOpen(role, 'calibration')).toBe(true);
		}
		expect(may('landlord', 'records.view')).toBe(false);
		expect(may('landlord', 'records.sign')).toBe(false);
		expect(mayOpen('landlord', 'calibration')).toBe(false);
	});
});
