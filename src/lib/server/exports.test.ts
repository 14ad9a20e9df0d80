// Cell and hotspot exports against real rows: the same figures as the map, scoped like the map.
import { beforeAll, describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { db } from '$lib/server/db';
import { tankMixes } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { grant, join, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { addApplication, addField, square, type FieldRow } from '$lib/server/testing/results-fixtures';
import { exportCells, exportFile } from './exports';

let manager: Actor;
let landlord: Actor;
let outsider: Actor;
let fieldA: FieldRow;
let fieldB: FieldRow;

beforeAll(async () => {
	const farm = await makeFarm();
	const other = await makeFarm();
	const [m, l] = [await makeUser(), await makeUser()];
	await join(farm.id, m.id, 'manager');
	await join(farm.id, l.id, 'landlord');
	const f = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	manager = { user: m, farm: f, role: 'manager' };
	landlord = { user: l, farm: f, role: 'landlord' };
	outsider = { user: m, farm: { id: other.id, slug: other.slug, name: other.name, currency: other.currency }, role: 'manager' };
	fieldA = await addField(farm.id, 'Invented, "A"', square(0, 0, 0.01, 0.01));
	fieldB = await addField(farm.id, 'Invented B', square(0.03, 0, 0.04, 0.01));
	await grant(farm.id, l.id, fieldA.id);
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Invented mix', carrierRateLPerM2: 0.01 }).returning();
	// [col, row, area, covered, sprayed] m²; the farm threshold is 20 %.
	await addApplication(farm.id, fieldA.id, mix.id, '2024-05-01', [[2, 3, 100, 100, 5], [3, 3, 100, 100, 50]]);
	await addApplication(farm.id, fieldA.id, mix.id, '2025-05-01', [[2, 3, 100, 80, 20], [3, 3, 100, 40, 30]]);
	await addApplication(farm.id, fieldA.id, mix.id, '2025-06-01', [[2, 3, 100, 100, 40]]);
	await addApplication(farm.id, fieldB.id, mix.id, '2025-05-02', [[5, 5, 100, 100, 100]]);
});

const season = (s: number) => ({ kind: 'season' as const, season: s });

describe('cell exports', () => {
	it("sum a season's passes per cell: covered, sprayed, volume, the best pass's cover, hotspot at the saved threshold", async () => {
		const cells = (await exportCells(manager, 'cells', season(2025), fieldA.id))!;
		expect(cells.map((c) => [c.col, c.row, c.coveredM2, c.sprayedM2, Number(c.volumeL.toFixed(9)), c.cover, c.hot])).toEqual([
			[2, 3, 180, 60, 0.6, 1, true], // 60 / 180 = 33 %
			[3, 3, 40, 30, 0.3, 0.4, false] // 75 % of a cell only 40 % driven over: not a hotspot
		]);
		const all = (await exportCells(manager, 'cells', season(2025), null))!;
		expect(new Set(all.map((c) => c.fieldId))).toEqual(new Set([fieldA.id, fieldB.id]));
	});

	it('hotspots only; comparing two seasons names persistent, new and cleared', async () => {
		const hot = (await exportCells(manager, 'hotspots', season(2025), null))!;
		expect(hot.map((c) => `${c.fieldId === fieldA.id ? 'A' : 'B'}${c.col},${c.row}`).sort()).toEqual(['A2,3', 'B5,5']);
		const compared = (await exportCells(manager, 'hotspots', { kind: 'compare', earlier: 2024, later: 2025 }, null))!;
		// 2024: (3,3) hot at 50 %; 2025: (2,3) hot, (3,3) not (cover 0.4); field B new.
		const status = Object.fromEntries(compared.map((c) => [`${c.fieldId === fieldA.id ? 'A' : 'B'}${c.col},${c.row}`, c.status]));
		expect(status).toEqual({ 'A2,3': 'new', 'A3,3': 'cleared', 'B5,5': 'new' });
	});

	it("a landlord's export holds granted fields only; another farm's field is no export", async () => {
		const mine = (await exportCells(landlord, 'cells', season(2025), null))!;
		expect(new Set(mine.map((c) => c.fieldId))).toEqual(new Set([fieldA.id]));
		expect(await exportCells(landlord, 'cells', season(2025), fieldB.id)).toBeNull();
		expect(await exportCells(outsider, 'cells', season(2025), fieldA.id)).toBeNull();
	});

	it('names files after the farm, seasons and kind, in each format', async () => {
		const cells = (await exportCells(manager, 'cells', season(2025), fieldA.id))!;
		const csv = exportFile(cells, 'csv', 'farm-a-2025-cells', season(2025));
		expect(csv.filename).toBe('farm-a-2025-cells.csv');
		const rows = Papa.parse<Record<string, string>>(csv.body as string, { header: true, skipEmptyLines: true }).data;
		expect(rows[0]).toMatchObject({ field: 'Invented, "A"', cov_m2: '180', spr_m2: '60', share_pct: '33.33', vol_l: '0.6' });
		expect(exportFile(cells, 'geojson', 'b', season(2025)).contentType).toBe('application/geo+json');
		expect(exportFile(cells, 'shp', 'b', season(2025)).filename).toBe('b-shapefile.zip');
	});
});
