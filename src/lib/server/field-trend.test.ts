// The field page's year-over-year data against the rows it comes from. Expected values are worked
// here from the inserted rows, independently of the map's SQL: share = sprayed / covered summed
// over a season's applications; a hotspot is a cell whose season share reaches the threshold with
// at least half of it driven over in one application (the map contract, issue 5).
import { beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { applications, cellResults, fields, tankMixes, type Field } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { join, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { fieldTrend, smallMultiples } from './field-trend';

let manager: Actor;
let operator: Actor;
let field: Field;
let other: Field;
const CARRIER = 0.01; // L/m2 (100 L/ha)
type CellIn = [col: number, row: number, area: number, covered: number, sprayed: number];
const inserted: { season: number; volumeL: number; cells: CellIn[] }[] = [];

async function addApplication(f: Field, mixId: string, day: string, volumeL: number, cells: CellIn[]) {
	const season = Number(day.slice(0, 4));
	const [a] = await db
		.insert(applications)
		.values({
			farmId: f.farmId, fieldId: f.id, tankMixId: mixId, day, season,
			startedAt: new Date(`${day}T08:00:00Z`), endedAt: new Date(`${day}T09:00:00Z`), fixCount: 10,
			coveredM2: cells.reduce((s, c) => s + c[3], 0), sprayedM2: cells.reduce((s, c) => s + c[4], 0), volumeL
		})
		.returning();
	await db.insert(cellResults).values(cells.map(([col, row, areaM2, coveredM2, sprayedM2]) => ({ applicationId: a.id, fieldId: f.id, col, row, areaM2, coveredM2, sprayedM2, volumeL: 0 })));
	if (f.id === field.id) inserted.push({ season, volumeL, cells });
}

beforeAll(async () => {
	const farm = await makeFarm(); // threshold 20 % by default
	const f = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	const [m, o] = [await makeUser(), await makeUser()];
	await join(farm.id, m.id, 'manager');
	await join(farm.id, o.id, 'operator');
	manager = { user: m, farm: f, role: 'manager' };
	operator = { user: o, farm: f, role: 'operator' };
	const square = (w: number) => ({ type: 'Polygon' as const, coordinates: [[[w, 0], [w + 0.01, 0], [w + 0.01, 0.01], [w, 0.01], [w, 0]]] });
	[field] = await db.insert(fields).values({ farmId: farm.id, name: 'Trend field', ...fieldGeometryColumns(square(0)) }).returning();
	[other] = await db.insert(fields).values({ farmId: farm.id, name: 'Other field', ...fieldGeometryColumns(square(0.03)) }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Invented mix', carrierRateLPerM2: CARRIER }).returning();
	// Cell (5,5) hot every season (persistent); (6,5) hot in 2024 only (cleared 2025);
	// (7,5) hot from 2025 (new 2025, persistent 2026); (8,5) 60 % but only 40 % driven over: never hot;
	// (9,5) cold everywhere. Areas of 100 m2, (7,5) of 80 m2 (cut by the boundary).
	await addApplication(field, mix.id, '2024-04-10', 30, [[5, 5, 100, 100, 50], [6, 5, 100, 100, 30], [7, 5, 80, 80, 4], [9, 5, 100, 100, 1]]);
	await addApplication(field, mix.id, '2025-04-10', 20, [[5, 5, 100, 100, 40], [6, 5, 100, 100, 5], [7, 5, 80, 80, 40], [8, 5, 100, 40, 24]]);
	await addApplication(field, mix.id, '2025-06-10', 5, [[6, 5, 100, 100, 10]]);
	await addApplication(field, mix.id, '2026-04-10', 10, [[5, 5, 100, 100, 25], [7, 5, 80, 80, 30], [9, 5, 100, 100, 2]]);
	// Another field's hotspots must not count.
	await addApplication(other, mix.id, '2025-04-10', 5, [[1, 1, 100, 100, 90]]);
});

/** Season figures worked from the inserted rows. */
function expected(season: number) {
	const apps = inserted.filter((a) => a.season === season);
	const cells = new Map<string, { area: number; cov: number; spr: number; cover: number }>();
	for (const a of apps) {
		for (const [col, row, area, cov, spr] of a.cells) {
			const c = cells.get(`${col},${row}`) ?? { area, cov: 0, spr: 0, cover: 0 };
			c.cov += cov;
			c.spr += spr;
			c.cover = Math.max(c.cover, cov / area);
			cells.set(`${col},${row}`, c);
		}
	}
	const hot = new Map([...cells].filter(([, c]) => c.cov > 0 && c.cover >= 0.5 && (100 * c.spr) / c.cov >= 20).map(([k, c]) => [k, c.area]));
	const covered = apps.reduce((s, a) => s + a.cells.reduce((t, c) => t + c[3], 0), 0);
	const sprayed = apps.reduce((s, a) => s + a.cells.reduce((t, c) => t + c[4], 0), 0);
	const volume = apps.reduce((s, a) => s + a.volumeL, 0);
	return { hot, sprayedPercent: (100 * sprayed) / covered, savedPercent: 100 * (1 - volume / (covered * CARRIER)) };
}

describe('field year over year', () => {
	it('per season: percent sprayed, chemical saved and hotspot area equal the stored rows', async () => {
		const trend = await fieldTrend(manager, field);
		expect(trend.seasons.map((s) => s.season)).toEqual([2024, 2025, 2026]);
		for (const s of trend.seasons) {
			const e = expected(s.season);
			expect(s.sprayedPercent).toBeCloseTo(e.sprayedPercent, 9);
			expect(s.savedPercent).toBeCloseTo(e.savedPercent, 9);
			expect(s.hotspots).toBe(e.hot.size);
			expect(s.hotspotAreaM2).toBeCloseTo([...e.hot.values()].reduce((a, b) => a + b, 0), 9);
		}
		// Straight from SQL as well: sprayed over covered of the applications table.
		const direct = await db.execute<{ season: number; p: number }>(
			sql`select season, 100 * sum(sprayed_m_2) / sum(covered_m_2) as p from applications where field_id = ${field.id} group by season order by season`
		);
		expect(trend.seasons.map((s) => s.sprayedPercent)).toEqual(direct.map((d) => d.p));
	});

	it('each consecutive pair: persistent, new and cleared hotspot areas by the definition', async () => {
		const trend = await fieldTrend(manager, field);
		expect(trend.pairs.map((p) => [p.earlier, p.later])).toEqual([[2024, 2025], [2025, 2026]]);
		for (const p of trend.pairs) {
			const e = expected(p.earlier).hot, l = expected(p.later).hot;
			const sum = (keys: string[], from: Map<string, number>) => keys.reduce((s, k) => s + from.get(k)!, 0);
			const persistent = [...l.keys()].filter((k) => e.has(k));
			const fresh = [...l.keys()].filter((k) => !e.has(k));
			const cleared = [...e.keys()].filter((k) => !l.has(k));
			expect([p.persistent, p.new, p.cleared]).toEqual([persistent.length, fresh.length, cleared.length]);
			expect(p.persistentAreaM2).toBeCloseTo(sum(persistent, l), 9);
			expect(p.newAreaM2).toBeCloseTo(sum(fresh, l), 9);
			expect(p.clearedAreaM2).toBeCloseTo(sum(cleared, e), 9);
		}
		// By hand: 2024 -> 2025 (5,5) persistent, (7,5) new at 80 m2, (6,5) cleared ((5 + 10) / 200 = 7.5 %).
		expect(trend.pairs[0]).toMatchObject({ persistent: 1, new: 1, cleared: 1, persistentAreaM2: 100, newAreaM2: 80, clearedAreaM2: 100 });
	});

	it('a field with one season: its own hotspots, no pairs; other fields never count', async () => {
		const trend = await fieldTrend(manager, other);
		expect(trend.pairs).toEqual([]);
		expect(trend.seasons).toHaveLength(1);
		expect(trend.seasons[0]).toMatchObject({ season: 2025, hotspots: 1, hotspotAreaM2: 100, sprayedPercent: 90 });
	});

	it('money saved only for roles that see prices', async () => {
		expect((await fieldTrend(operator, field)).seasons.every((s) => s.savedCost === null)).toBe(true);
	});

	it('small multiples: one map per season, each drawing exactly the cells driven over', async () => {
		const { span, maps } = await smallMultiples(manager, field, [2026, 2024, 2025]);
		expect(span).toBe(1);
		expect(maps.map((m) => m.season)).toEqual([2024, 2025, 2026]);
		for (const m of maps) {
			const drawn = [...m.fills.map((f) => f.d), m.hatch].join('').match(/h(\d+)/g)!.reduce((s, h) => s + Number(h.slice(1)), 0);
			const cells = new Set(inserted.filter((a) => a.season === m.season).flatMap((a) => a.cells.filter((c) => c[3] > 0).map((c) => `${c[0]},${c[1]}`)));
			expect(drawn).toBe(cells.size);
		}
		// (8,5) in 2025: 40 % driven over, hatched.
		expect(maps[1].hatch).toMatch(/^M8 /);
	});
});
