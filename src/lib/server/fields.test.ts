import { expect, test } from 'vitest';
import { grant, join, makeFarm, makeField, makeUser } from '$lib/server/testing/fixtures';
import { list } from './fields';

test('a landlord lists only granted fields; a manager lists all the farm’s and none of another farm’s', async () => {
	const farm = await makeFarm();
	const other = await makeFarm();
	const manager = await makeUser();
	const landlord = await makeUser();
	await join(farm.id, manager.id, 'manager');
	await join(farm.id, landlord.id, 'landlord');
	const a = await makeField(farm.id, 'A');
	await makeField(farm.id, 'B');
	await makeField(other.id, 'Elsewhere');
	await grant(farm.id, landlord.id, a.id);

	const farmRef = { id: farm.id, slug: farm.slug, name: farm.name };
	expect((await list({ user: manager, farm: farmRef, role: 'manager' })).map((f) => f.name)).toEqual(['A', 'B']);
	expect((await list({ user: landlord, farm: farmRef, role: 'landlord' })).map((f) => f.name)).toEqual(['A']);
});
