// The team routes call the guard before anything else: operators, agronomists and landlords get
// 403 on the page, every action, the audit log and its CSV; a manager of another farm gets 404.
import { describe, expect, it } from 'vitest';
import type { Role } from '$lib/server/db/schema';
import { eventFor, join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import { actions, load } from '../../../routes/(app)/[farm]/team/+page.server';
import { load as auditLoad } from '../../../routes/(app)/[farm]/team/audit/+page.server';
import { GET as auditCsv } from '../../../routes/(app)/[farm]/team/audit/csv/+server';
import { GET as teamApi } from '../../../routes/api/farms/[farm]/team/+server';

type AnyFn = (e: never) => Promise<unknown> | unknown;

describe('team routes', () => {
	it('only the farm’s managers get through', async () => {
		const farm = await makeFarm();
		const others = await makeFarm();
		const people: Partial<Record<Role | 'outsider', Awaited<ReturnType<typeof makeUser>>>> = {};
		for (const role of ['manager', 'agronomist', 'operator', 'landlord'] as Role[]) {
			people[role] = await makeUser();
			await join(farm.id, people[role]!.id, role);
		}
		people.outsider = await makeUser();
		await join(others.id, people.outsider.id, 'manager');

		const handlers: [string, AnyFn][] = [
			['load', load as AnyFn],
			['audit', auditLoad as AnyFn],
			['csv', auditCsv as AnyFn],
			['api', teamApi as AnyFn],
			...Object.entries(actions).map(([name, fn]) => [`action ${name}`, fn as AnyFn] as [string, AnyFn])
		];
		for (const [name, fn] of handlers) {
			const status = async (who: keyof typeof people) => statusOf(Promise.resolve().then(() => fn(eventFor(people[who]!, { farm: farm.slug }) as never)));
			for (const role of ['agronomist', 'operator', 'landlord'] as const) expect([name, role, await status(role)]).toEqual([name, role, 403]);
			expect([name, 'outsider', await status('outsider')]).toEqual([name, 'outsider', 404]);
		}
		// The manager passes the guard (reads succeed; actions then need a form).
		for (const fn of [load, auditLoad] as AnyFn[]) {
			const e = eventFor(people.manager!, { farm: farm.slug }, `/${farm.slug}/team`);
			expect(await statusOf(Promise.resolve().then(() => fn(e as never)))).toBe(200);
		}
	});
});
