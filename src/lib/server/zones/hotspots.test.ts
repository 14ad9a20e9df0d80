// Zones from hotspots against invented cell results whose hot cells follow by hand from the map's
// definition (src/lib/server/map/data.ts): treated share = sprayed / covered summed over the
// season's applications, at or above the farm's threshold, with at least half of the cell covered
// by one application. Persistent = hot in both seasons.
import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { applications, cellResults, farms, fields, tankMixes } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { join, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { defaultPrefix, hotCells, hotspotPreview, parseHotspotMode } from './hotspots';
import { createZones } from './zones';

let actor: Actor;
let field: typeof fields.$inferSelect;

/** cells: [col, row, coveredM2, sprayedM2] of a 100 m² cell. */
async function season(day: string, mixId: string, cells: [number, number, number, number][]) {
	const [a] = await db
		.insert(applications)
		.values({ farmId: actor.farm.id, fieldId: field.id, tankMixId: mixId, day, season: Number(day.slice(0, 4)), startedAt: new Date(`${day}T08:00:00Z`), endedAt: new Date(`${day}T09:00:00Z`), fixCount: 1, coveredM2: 1, sprayedM2: 1, volumeL: 1 })
		.returning();
	await db.insert(cellResults).values(cells.map(([col, row, coveredM2, sprayedM2]) => ({ applicationId: a.id, fieldId: field.id, col, row, areaM2: 100, coveredM2, sprayedM2, volumeL: 0 })));
}

beforeAll(async () => {
	const farm = await makeFarm();
	const user = await makeUser();
	await join(farm.id, user.id, 'agronomist');
	actor = { user, farm: { id: farm.id, slug: farm.slug, name: farm.name, currency: 'USD' }, role: 'agronomist' };
	[field] = await db
		.insert(fields)
		.values({ farmId: farm.id, name: 'Invented', ...fieldGeometryColumns({ type: 'Polygon', coordinates: [[[-118.32, 47.12], [-118.3, 47.12], [-118.3, 47.129], [-118.32, 47.129], [-118.32, 47.12]]] }) })
		.returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Mix', carrierRateLPerM2: 0.01 }).returning();
	// 2025: a 3 x 2 block hot (share 50 %), a cell at 19 % (not hot at 20 %), a cell with 40 % covered (not judged).
	await season('2025-04-14', mix.id, [
		...[10, 11, 12].flatMap((col) => [20, 21].map((row): [number, number, number, number] => [col, row, 100, 50])),
		[30, 30, 100, 19],
		[40, 40, 40, 40]
	]);
	// 2026: the block's left column cools to 10 %; a new hot cell at 50, 50; the 19 % cell reaches 25 %.
	await season('2026-04-13', mix.id, [
		...[20, 21].map((row): [number, number, number, number] => [10, row, 100, 10]),
		...[11, 12].flatMap((col) => [20, 21].map((row): [number, number, number, number] => [col, row, 100, 60])),
		[50, 50, 100, 80],
		[30, 30, 100, 25]
	]);
});

describe('hot cells by the map definition', () => {
	it('a season: share at or above the threshold, at least half the cell covered', async () => {
		const cells = await hotCells(actor, field, { kind: 'season', season: 2025 }, 20);
		expect(cells.map((c) => `${c.col},${c.row}`).sort()).toEqual(['10,20', '10,21', '11,20', '11,21', '12,20', '12,21']);
		// At 19 % the threshold takes in the 19 % cell.
		expect(await hotCells(actor, field, { kind: 'season', season: 2025 }, 19)).toHaveLength(7);
	});

	it('persistent: hot in both seasons only', async () => {
		const cells = await hotCells(actor, field, { kind: 'persistent', earlier: 2025, later: 2026 }, 20);
		expect(cells.map((c) => `${c.col},${c.row}`).sort()).toEqual(['11,20', '11,21', '12,20', '12,21']);
	});
});

describe('hotspotPreview', () => {
	it('merges the persistent cells into one zone, named after the seasons, at the farm threshold', async () => {
		const preview = (await hotspotPreview(actor, field.id, { kind: 'persistent', earlier: 2025, later: 2026 }, { bufferM: 5, minAreaM2: 500 }))!;
		expect(preview.thresholdPercent).toBe(20);
		expect(preview.hotCells).toBe(4);
		expect(preview.zones).toHaveLength(1);
		expect(preview.zones[0].name).toBe('Persistent 2025–26 1');
		expect(preview.zones[0].cellCount).toBe(4);
		// 20 x 20 m of cells grown by 5 m: 30 x 30 m = 900 m² in UTM, / k² on the ground (k ≈ 0.99972 here).
		expect(preview.zones[0].areaM2).toBeGreaterThan(900);
		expect(preview.zones[0].areaM2).toBeLessThan(900 * 1.001);
	});

	it('follows the farm threshold and leaves small patches out; names skip those taken', async () => {
		await db.update(farms).set({ hotspotThresholdPercent: 55 }).where(eq(farms.id, actor.farm.id));
		const season = (await hotspotPreview(actor, field.id, { kind: 'season', season: 2026 }, { bufferM: 0, minAreaM2: 150 }))!;
		// At 55 %: the 2 x 2 block (60 %) and the lone cell (80 %); the lone cell (100 m²) is under 150 m².
		expect(season.hotCells).toBe(5);
		expect(season.zones).toHaveLength(1);
		expect(season.tooSmall).toBe(1);
		await db.update(farms).set({ hotspotThresholdPercent: 20 }).where(eq(farms.id, actor.farm.id));
		const saved = await createZones(actor, field.id, [{ name: 'Hot 2026 1', geometry: season.zones[0].geometry }], { via: 'hotspots' });
		expect(saved && 'zones' in saved).toBe(true);
		const again = (await hotspotPreview(actor, field.id, { kind: 'season', season: 2026 }, { bufferM: 0, minAreaM2: 0 }))!;
		// The block is a zone now; the lone cell and the 25 % cell remain, numbered past the taken name.
		expect(again.insideExisting).toBe(1);
		expect(again.zones.map((z) => z.name)).toEqual(['Hot 2026 2', 'Hot 2026 3']);
	});
});

describe('parseHotspotMode', () => {
	it('reads the query and says what is wrong', () => {
		expect(parseHotspotMode(new URLSearchParams('mode=persistent&earlier=2025&later=2026'))).toEqual({ kind: 'persistent', earlier: 2025, later: 2026 });
		expect(parseHotspotMode(new URLSearchParams('season=2026'))).toEqual({ kind: 'season', season: 2026 });
		expect(parseHotspotMode(new URLSearchParams('mode=persistent&earlier=2026&later=2025'))).toEqual({ error: 'The earlier season must come before the later one.' });
		expect(parseHotspotMode(new URLSearchParams('season=x'))).toEqual({ error: 'Choose a season.' });
		expect(defaultPrefix({ kind: 'persistent', earlier: 2024, later: 2026 })).toBe('Persistent 2024–26');
	});
});
