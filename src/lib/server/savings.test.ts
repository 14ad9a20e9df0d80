// The savings report against real rows: the demo-like fixture of src/lib/compute/savings-table.test.ts
// (the demo farm's catalogue, invented applications with round numbers) stored in PostgreSQL and
// read back through figures.listApplications and the catalogue's prices.
import { beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { applications, fields, products, tankMixProducts, tankMixes } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import { join, makeFarm, makeUser, statusOf } from '$lib/server/testing/fixtures';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { savingsCsv } from '$lib/savings/csv';
import { allRows, parseFilter, report, reportFor } from './savings';

const HA = 1e4;
let actors: Record<'manager' | 'agronomist' | 'operator' | 'landlord', Actor>;
let other: Actor;
const ids: Record<string, string> = {};

const square = (w: number, s: number) => ({ type: 'Polygon' as const, coordinates: [[[w, s], [w + 0.01, s], [w + 0.01, s + 0.01], [w, s + 0.01], [w, s]]] });

beforeAll(async () => {
	const farm = await makeFarm();
	const f = { id: farm.id, slug: farm.slug, name: farm.name, currency: farm.currency };
	actors = {} as typeof actors;
	for (const role of ['manager', 'agronomist', 'operator', 'landlord'] as const) {
		const u = await makeUser();
		await join(farm.id, u.id, role);
		actors[role] = { user: u, farm: f, role };
	}
	const [nf] = await db.insert(fields).values({ farmId: farm.id, name: 'North Flat', ...fieldGeometryColumns(square(0, 0)) }).returning();
	const [cd] = await db.insert(fields).values({ farmId: farm.id, name: 'Coyote Draw', ...fieldGeometryColumns(square(0.02, 0)) }).returning();
	ids.nf = nf.id;
	ids.cd = cd.id;
	const product = async (name: string, unit: 'L' | 'kg', pricePerUnit: number | null) =>
		(await db.insert(products).values({ farmId: farm.id, name, unit, pricePerUnit }).returning())[0].id;
	ids.gly = await product('Glyphosate 540 (demo)', 'L', 6.4);
	ids.dic = await product('Dicamba 480 (demo)', 'L', 15.8);
	ids.flu = await product('Flumioxazin 51 WG (demo)', 'kg', 118);
	ids.unused = await product('Never used (demo)', 'L', 1);
	const mix = async (name: string, carrierLPerHa: number, rates: [string, number][]) => {
		const [m] = await db.insert(tankMixes).values({ farmId: farm.id, name, carrierRateLPerM2: carrierLPerHa / HA }).returning();
		await db.insert(tankMixProducts).values(rates.map(([productId, perHa]) => ({ tankMixId: m.id, productId, ratePerM2: perHa / HA })));
		return m.id;
	};
	const fallow = await mix('Fallow knockdown', 100, [[ids.gly, 1.5], [ids.dic, 0.3]]);
	const residual = await mix('Residual patch programme', 120, [[ids.gly, 1.5], [ids.flu, 0.21]]);
	const app = (fieldId: string, tankMixId: string, day: string, coveredHa: number, volumeL: number) => ({
		farmId: farm.id, fieldId, tankMixId, day, season: Number(day.slice(0, 4)),
		startedAt: new Date(`${day}T08:00:00Z`), endedAt: new Date(`${day}T10:00:00Z`), fixCount: 100,
		coveredM2: coveredHa * HA, sprayedM2: coveredHa * HA * 0.1, volumeL
	});
	await db.insert(applications).values([
		app(nf.id, fallow, '2025-04-14', 100, 1200),
		app(cd.id, fallow, '2025-04-15', 50, 900),
		app(cd.id, residual, '2025-06-10', 4, 240),
		app(cd.id, fallow, '2024-04-10', 50, 600)
	]);

	// Another farm with its own rows, which must never show up.
	const farm2 = await makeFarm();
	const u2 = await makeUser();
	await join(farm2.id, u2.id, 'manager');
	other = { user: u2, farm: { id: farm2.id, slug: farm2.slug, name: farm2.name, currency: farm2.currency }, role: 'manager' };
	const [f2] = await db.insert(fields).values({ farmId: farm2.id, name: 'Elsewhere', ...fieldGeometryColumns(square(1, 1)) }).returning();
	const [m2] = await db.insert(tankMixes).values({ farmId: farm2.id, name: 'Other mix', carrierRateLPerM2: 0.01 }).returning();
	await db.insert(applications).values({ ...app(f2.id, m2.id, '2025-04-14', 10, 10), farmId: farm2.id });
});

describe('savings report from the database', () => {
	it('check values worked by hand from the demo-like fixture (see savings-table.test.ts)', async () => {
		const r = await report(actors.manager, {});
		const row = (season: number, field: string, product: string) => r.rows.find((x) => x.season === season && x.fieldId === ids[field] && x.productId === ids[product])!;
		// North Flat 2025: 1,200 of 10,000 L broadcast-equivalent liquid -> 18 of 150 L glyphosate; 132 L x 6.40.
		expect(row(2025, 'nf', 'gly').savedCost).toBeCloseTo(844.8, 6);
		// Dicamba: 30 L broadcast, 3.6 L applied, 26.4 L x 15.80 = 417.12.
		expect(row(2025, 'nf', 'dic').savedCost).toBeCloseTo(417.12, 6);
		// Coyote Draw 2025 glyphosate: spring 75 L -> 13.5 L, June 6 L -> 3 L: 64.5 L saved = 412.80.
		expect(row(2025, 'cd', 'gly').savedUnits).toBeCloseTo(64.5, 9);
		expect(row(2025, 'cd', 'flu').savedUnits).toBeCloseTo(0.42, 9);
		// Season 2025: 1,918.62; season 2024: 66 L x 6.40 + 13.2 L x 15.80 = 422.40 + 208.56 = 630.96.
		expect(r.bySeason).toHaveLength(2);
		expect(r.bySeason[0].season).toBe(2025);
		expect(r.bySeason[0].savedCost).toBeCloseTo(1918.62, 6);
		expect(r.bySeason[1].savedCost).toBeCloseTo(630.96, 6);
		expect(r.totals.savedCost).toBeCloseTo(1918.62 + 630.96, 6);
	});

	it('figures per field sum to the farm totals, per product and in money', async () => {
		const all = await report(actors.manager, {});
		for (const season of all.seasons) {
			const farmTotals = (await report(actors.manager, { season })).totals;
			const perField = await Promise.all(all.fields.map((f) => report(actors.manager, { season, fieldId: f.id })));
			expect(perField.reduce((s, p) => s + p.totals.savedCost, 0)).toBeCloseTo(farmTotals.savedCost, 9);
			for (const product of farmTotals.products) {
				const sum = perField.reduce((s, p) => s + (p.totals.products.find((x) => x.productId === product.productId)?.savedUnits ?? 0), 0);
				expect(sum).toBeCloseTo(product.savedUnits, 9);
			}
		}
	});

	it('money is the saved quantity times the catalogue price', async () => {
		const rows = await allRows(actors.manager);
		const prices = new Map((await db.select().from(products)).map((p) => [p.id, p.pricePerUnit]));
		expect(rows.length).toBe(7);
		for (const r of rows) expect(r.savedCost).toBeCloseTo(r.savedUnits * prices.get(r.productId)!, 9);
	});

	it('the amounts equal what the stored applications and tank mixes give', async () => {
		// Straight from the rows: applied = volume x product rate / carrier rate, summed in SQL.
		const rows = await allRows(actors.manager);
		const direct = await db.execute<{ season: number; field_id: string; product_id: string; applied: number; broadcast: number }>(
			sql`select a.season, a.field_id, p.product_id, sum(a.volume_l * p.rate_per_m_2 / m.carrier_rate_l_per_m_2) as applied, sum(a.covered_m_2 * p.rate_per_m_2) as broadcast
			 from applications a join tank_mixes m on m.id = a.tank_mix_id join tank_mix_products p on p.tank_mix_id = m.id
			 where a.farm_id = ${actors.manager.farm.id} group by 1, 2, 3`
		);
		expect(direct.length).toBe(rows.length);
		for (const d of direct) {
			const r = rows.find((x) => x.season === d.season && x.fieldId === d.field_id && x.productId === d.product_id)!;
			expect(r.appliedUnits).toBeCloseTo(d.applied, 9);
			expect(r.broadcastUnits).toBeCloseTo(d.broadcast, 9);
		}
	});

	it('filters by season, field and product; lists only products that were used', async () => {
		const r = await report(actors.manager, { season: 2025, fieldId: ids.cd, productId: ids.gly });
		expect(r.rows).toHaveLength(1);
		expect(r.rows[0].applications).toBe(2);
		expect(r.products.map((p) => p.name)).not.toContain('Never used (demo)');
		expect(r.fields.map((f) => f.name)).toEqual(['Coyote Draw', 'North Flat']);
	});

	it('a filter in the URL that names nothing is dropped with a sentence, not an error', async () => {
		const r = await reportFor(actors.manager, new URLSearchParams('season=1999&field=nope&product=' + ids.unused));
		expect(r.problems).toHaveLength(3);
		expect(r.problems[0]).toMatch(/Season “1999” has no applications/);
		expect(r.filter).toEqual({});
		expect(r.rows).toHaveLength(7);
		const ok = parseFilter(new URLSearchParams(`season=2024&field=${ids.cd}`), r);
		expect(ok).toEqual({ filter: { season: 2024, fieldId: ids.cd }, problems: [] });
	});

	it('without a season in the URL the latest season shows; season=all shows every one', async () => {
		expect((await reportFor(actors.manager, new URLSearchParams(''))).filter).toEqual({ season: 2025 });
		expect((await reportFor(actors.manager, new URLSearchParams('season=all'))).rows).toHaveLength(7);
	});

	it('per field and season: money that adds up to the season totals; a season without the field is empty', async () => {
		const r = await report(actors.manager, {});
		const nf = r.byField.find((f) => f.fieldId === ids.nf)!;
		expect(nf.seasons[2024]).toBeNull();
		expect(nf.seasons[2025]).toBeCloseTo(844.8 + 417.12, 6);
		for (const s of r.bySeason) expect(r.byField.reduce((sum, f) => sum + (f.seasons[s.season] ?? 0), 0)).toBeCloseTo(s.savedCost, 9);
		expect(r.byField.reduce((sum, f) => sum + f.savedCost, 0)).toBeCloseTo(r.totals.savedCost, 9);
	});

	it('another farm’s applications never show', async () => {
		const mine = await allRows(actors.manager);
		expect(mine.every((r) => r.fieldId === ids.nf || r.fieldId === ids.cd)).toBe(true);
		expect(await allRows(other)).toEqual([]);
	});

	it('only managers: agronomists, operators and landlords are refused', async () => {
		expect(await statusOf(allRows(actors.manager))).toBe(200);
		for (const role of ['agronomist', 'operator', 'landlord'] as const) expect(await statusOf(allRows(actors[role]))).toBe(403);
	});

	it('the CSV holds the same rows as the page', async () => {
		const r = await reportFor(actors.manager, new URLSearchParams(''));
		const csv = savingsCsv(r.rows, 'metric', 'USD');
		expect(csv.trimEnd().split('\r\n')).toHaveLength(1 + 5);
		expect(csv).toContain('2025,North Flat,Glyphosate 540 (demo),1,100,150,,18,,132,,88,6.4,,960,115.2,844.8,1.152,8.448');
	});
});
