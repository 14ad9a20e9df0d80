import { and, eq } from 'drizzle-orm';
import { expect, test } from 'vitest';
import { db } from '$lib/server/db';
import { auditLog, farms } from '$lib/server/db/schema';
import { join, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { listForUser, setHotspotThreshold } from './farms';

test('the hotspot threshold is kept per farm, rounded to 0.1, range-checked and audited', async () => {
	const farm = await makeFarm();
	const other = await makeFarm();
	const agronomist = await makeUser();
	const actor = { farm: { id: farm.id }, user: { id: agronomist.id } };

	expect(await setHotspotThreshold(actor, 12.34)).toEqual({ ok: true, percent: 12.3 });
	const [saved] = await db.select({ p: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, farm.id));
	expect(saved.p).toBe(12.3);
	// Another farm keeps its own (the default, 20 %).
	const [untouched] = await db.select({ p: farms.hotspotThresholdPercent }).from(farms).where(eq(farms.id, other.id));
	expect(untouched.p).toBe(20);

	expect(await setHotspotThreshold(actor, 0.2)).toEqual({ error: 'The hotspot threshold must be a number from 0.5 to 100 %.' });
	expect(await setHotspotThreshold(actor, Number.NaN)).toHaveProperty('error');

	const entries = await db
		.select()
		.from(auditLog)
		.where(and(eq(auditLog.farmId, farm.id), eq(auditLog.action, 'farm.hotspot_threshold_set')));
	expect(entries).toHaveLength(1);
	expect(entries[0].detail).toEqual({ from: 20, to: 12.3 });
	// Saving the same value again writes no second entry.
	await setHotspotThreshold(actor, 12.3);
	expect(await db.select().from(auditLog).where(and(eq(auditLog.farmId, farm.id), eq(auditLog.action, 'farm.hotspot_threshold_set')))).toHaveLength(1);
});

test('the farm switcher lists a person’s farms with their role in each', async () => {
	const a = await makeFarm();
	const b = await makeFarm();
	const person = await makeUser();
	await join(a.id, person.id, 'agronomist');
	await join(b.id, person.id, 'landlord');
	const mine = await listForUser(person.id);
	expect(mine.map((f) => [f.slug, f.role]).sort()).toEqual([[a.slug, 'agronomist'], [b.slug, 'landlord']].sort());
});
