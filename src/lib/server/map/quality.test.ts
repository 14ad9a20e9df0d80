import { describe, expect, test } from 'vitest';
import { db } from '$lib/server/db';
import { applicationQuality, applications, fields, tankMixes } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { FLAG, type QualitySummary } from '$lib/compute/quality';
import { join, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { qualityLayer } from './quality';

const square = { type: 'Polygon' as const, coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]] };
const summary = { v: 1, sprayingDistanceM: 100, limits: {}, speed: { status: 'not-logged', source: 'positions' }, height: { status: 'not-logged' }, pressure: { status: 'not-logged' }, gaps: { count: 0, seconds: 0, distanceM: 0 } } as unknown as QualitySummary;

async function setUp() {
	const farm = await makeFarm();
	const user = await makeUser();
	await join(farm.id, user.id, 'manager');
	const actor: Actor = { user, farm: { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency }, role: 'manager' };
	const [field] = await db.insert(fields).values({ farmId: farm.id, name: 'North', ...fieldGeometryColumns(square) }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	const app = async (day: string) =>
		(
			await db
				.insert(applications)
				.values({ farmId: farm.id, fieldId: field.id, tankMixId: mix.id, day, season: Number(day.slice(0, 4)), startedAt: new Date(), endedAt: new Date(), fixCount: 2, coveredM2: 1, sprayedM2: 1, volumeL: 1 })
				.returning()
		)[0];
	return { actor, app };
}

describe('the quality layer', () => {
	test('flagged stretches of a season as GeoJSON lines with their kinds; applications without figures are counted', async () => {
		const { actor, app } = await setUp();
		const a = await app('2025-04-14');
		const b = await app('2025-04-15');
		await app('2024-04-10');
		await db.insert(applicationQuality).values({
			applicationId: a.id,
			summary,
			segmentCount: 2,
			segments: [
				{ f: FLAG.speed, c: [[-118.31, 47.125], [-118.305, 47.125]] },
				{ f: FLAG.speed | FLAG.height, c: [[-118.305, 47.125], [-118.304, 47.125]] }
			]
		});
		const layer = await qualityLayer(actor, { kind: 'season', season: 2025 });
		expect(layer.checked).toBe(1);
		expect(layer.unchecked).toBe(1);
		expect(layer.features.map((f) => [f.properties.kind, f.properties.kinds, f.properties.application])).toEqual([
			['speed', ['speed'], a.id],
			['several', ['speed', 'height'], a.id]
		]);
		expect(layer.features[0].geometry.coordinates[0]).toEqual([-118.31, 47.125]);
		expect((await qualityLayer(actor, { kind: 'application', applicationId: b.id })).features).toEqual([]);
		// Another farm's actor sees none of it.
		const other = await setUp();
		expect((await qualityLayer(other.actor, { kind: 'application', applicationId: a.id })).features).toEqual([]);
	});
});
