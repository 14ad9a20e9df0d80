// Zones and zone summaries against real rows: invented logs processed by the real pipeline, zones
// saved through the data functions, figures read back. The checks that matter:
//  - the zones plus the rest of the field add up to the field's figures, with the rest drawn
//    independently as its own region (field rings plus zone rings, even-odd: the field less the
//    zones), not by subtraction;
//  - a zone that covers the whole field equals the field;
//  - figures follow the zone's shape and the application's results (kept, then redrawn when stale);
//  - roles and farms: operators see no money, landlords only granted fields, other farms nothing.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { and, eq, sql } from 'drizzle-orm';
import type { Polygon } from 'geojson';
import { beforeAll, describe, expect, it } from 'vitest';
import { computeCoverage } from '$lib/compute/coverage';
import { areaM2 } from '$lib/geo/area';
import { fieldGeometryColumns } from '$lib/geo/field-geometry';
import { projectRings } from '$lib/geo/projection';
import { detectMapping } from '$lib/ingest/mapping';
import { db } from '$lib/server/db';
import { applicationFixes, applications, auditLog, fields, machines, products, tankMixProducts, tankMixes, uploads, zoneResults, zones } from '$lib/server/db/schema';
import type { Actor } from '$lib/server/auth/guard';
import * as figures from '$lib/server/figures';
import { concatFixes, unpackFixes } from '$lib/server/ingest/pack';
import { coverageInput, processUpload } from '$lib/server/ingest/process-upload';
import * as rawStore from '$lib/server/storage/raw-store';
import { grant, join as joinFarm, makeFarm, makeUser } from '$lib/server/testing/fixtures';
import { hotspotPreview } from './hotspots';
import { fieldZoneSummary } from './summary';
import { updateBoundary } from '$lib/server/fields';
import { createZones, listZones, removeZone, reshapeZone, updateZone } from './zones';

beforeAll(() => {
	process.env.PATCHBOOK_DATA_DIR = mkdtempSync(join(tmpdir(), 'pb-zones-'));
});

const rect = (w: number, s: number, e: number, n: number): Polygon => ({ type: 'Polygon', coordinates: [[[w, s], [e, s], [e, n], [w, n], [w, s]]] });
const FIELD = rect(-118.32, 47.12, -118.3, 47.129);
const mPerDegLat = 111_195;

/**
 * Passes 36.576 m apart at 5 Hz across the field. Nozzles open over invented weed patches: a
 * dense one (every nozzle of the left half, -118.313 to -118.309), a sparse band (every fourth
 * nozzle, -118.306 to -118.303) and in `season` 2026 also a new patch further east.
 */
function patchyCsv(day: string, passes: number, extraPatch: boolean) {
	const lines = ['time,lat,lon,nozzles'];
	let t = Date.parse(`${day}T16:00:00Z`) / 1000;
	const steps = 1300; // 1.2 m per 0.2 s over 0.02° of longitude (1.52 km): 22 km/h
	const [west, east] = [-118.3205, -118.2995];
	for (let p = 0; p < passes; p++) {
		const lat = 47.1225 + (p * 36.576) / mPerDegLat;
		for (let i = 0; i <= steps; i++) {
			const f = i / steps;
			const lng = p % 2 ? east - f * (east - west) : west + f * (east - west);
			const states = Array.from({ length: 144 }, (_, k) => {
				if (lng > -118.313 && lng < -118.309 && k < 72) return '1';
				if (lng > -118.306 && lng < -118.303 && k % 4 === 0) return '1';
				if (extraPatch && lng > -118.302 && lng < -118.3005 && k > 100) return '1';
				return '0';
			}).join('');
			lines.push(`${new Date(t * 1000).toISOString()},${lat.toFixed(8)},${lng.toFixed(8)},${states}`);
			t += 0.2;
		}
		t += 30;
	}
	return lines.join('\n') + '\n';
}

type Ctx = Awaited<ReturnType<typeof setUp>>;

async function setUp(boundary: Polygon = FIELD) {
	const farm = await makeFarm();
	const people = { manager: await makeUser(), agronomist: await makeUser(), operator: await makeUser(), landlord: await makeUser() };
	for (const [role, u] of Object.entries(people)) await joinFarm(farm.id, u.id, role as 'manager');
	const actor = (role: keyof typeof people): Actor => ({ user: people[role], farm: { id: farm.id, slug: farm.slug, name: farm.name, currency: 'USD' }, role });
	const [field] = await db.insert(fields).values({ farmId: farm.id, name: 'North', ...fieldGeometryColumns(boundary) }).returning();
	const [machine] = await db.insert(machines).values({ farmId: farm.id, name: 'Boom', boomWidthM: 36.576, nozzleCount: 144, nozzleSpacingM: 0.254 }).returning();
	const [mix] = await db.insert(tankMixes).values({ farmId: farm.id, name: 'Knockdown', carrierRateLPerM2: 0.01 }).returning();
	const [gly, dic] = await db
		.insert(products)
		.values([
			{ farmId: farm.id, name: 'Glyphosate', unit: 'L', pricePerUnit: 6.4 },
			{ farmId: farm.id, name: 'Dicamba', unit: 'L', pricePerUnit: 15.8 }
		])
		.returning();
	await db.insert(tankMixProducts).values([
		{ tankMixId: mix.id, productId: gly.id, ratePerM2: 1.5e-4 },
		{ tankMixId: mix.id, productId: dic.id, ratePerM2: 0.3e-4 }
	]);
	return { farm, people, actor, field, machine, mix };
}

async function processLog(ctx: Ctx, name: string, csv: string) {
	const stored = await rawStore.put(Readable.from([Buffer.from(csv)]), 1e9);
	await db.execute(sql`insert into raw_files (sha256, size_bytes) values (${stored.sha256}, ${stored.sizeBytes}) on conflict do nothing`);
	const lines = csv.split('\n');
	const mapping = detectMapping(lines[0].split(','), lines.slice(1, 6).map((l) => l.split(',')));
	const [row] = await db
		.insert(uploads)
		.values({ farmId: ctx.farm.id, uploadedBy: ctx.people.manager.id, fileName: name, format: 'csv', mapping: mapping as unknown as Record<string, unknown>, machineId: ctx.machine.id, tankMixId: ctx.mix.id, status: 'queued', ...stored })
		.returning();
	await processUpload(db, row.id, async () => {});
	return row;
}

/** The rest of the field drawn as its own region: field rings and zone rings, even-odd. */
async function restDrawnAlone(ctx: Ctx, season: number) {
	const field = (await db.select().from(fields).where(eq(fields.id, ctx.field.id)))[0];
	const zoneRows = await db.select().from(zones).where(eq(zones.fieldId, field.id));
	const rings = [...projectRings(field.gridProj, field.boundary), ...zoneRows.flatMap((z) => projectRings(field.gridProj, z.geometry))];
	const apps = await db.select().from(applications).where(and(eq(applications.fieldId, field.id), eq(applications.season, season)));
	const sum = { coveredM2: 0, sprayedM2: 0, volumeL: 0 };
	for (const a of apps) {
		const parts = await db.select().from(applicationFixes).where(eq(applicationFixes.applicationId, a.id));
		const fixes = concatFixes(parts.map((p) => unpackFixes(p.packed)));
		const { totals } = computeCoverage(coverageInput(field, fixes, ctx.machine), rings, { defaultRateLPerM2: ctx.mix.carrierRateLPerM2, windowToFixes: true });
		sum.coveredM2 += totals.coveredM2;
		sum.sprayedM2 += totals.sprayedM2;
		sum.volumeL += totals.volumeL;
	}
	return sum;
}

describe('zone summary of a field with drawn, cut and hotspot zones', () => {
	let ctx: Ctx;
	let upload2026: Awaited<ReturnType<typeof processLog>>;
	beforeAll(async () => {
		ctx = await setUp();
		await processLog(ctx, '2025.csv', patchyCsv('2025-04-14', 4, false));
		upload2026 = await processLog(ctx, '2026.csv', patchyCsv('2026-04-13', 4, true));
		const agronomist = ctx.actor('agronomist');
		const made = await createZones(
			agronomist,
			ctx.field.id,
			[
				{ name: 'Dense patch', geometry: rect(-118.3135, 47.1221, -118.3085, 47.1232), targetRateLPerM2: 0.012 },
				// Overlaps the first: cut, the first keeps the shared ground.
				{ name: 'Sparse band', geometry: rect(-118.31, 47.1222, -118.3025, 47.1234), description: 'every fourth nozzle' },
				// Reaches west out of the field: cut at the field's edge.
				{ name: 'West headland', geometry: rect(-118.3225, 47.1215, -118.318, 47.1236) }
			],
			{ via: 'drawn' }
		);
		if (!made || 'problems' in made) throw new Error(JSON.stringify(made));
		expect(made.zones[1].overlaps[0].name).toBe('Dense patch');
		expect(made.zones[2].outsideM2).toBeGreaterThan(1000);
		// And the 2026 hotspots that are left, as zones.
		const preview = await hotspotPreview(agronomist, ctx.field.id, { kind: 'season', season: 2026 }, { bufferM: 5, minAreaM2: 100 });
		expect(preview!.zones.length).toBeGreaterThan(0);
		const saved = await createZones(
			agronomist,
			ctx.field.id,
			preview!.zones.map((z) => ({ name: z.name, geometry: z.geometry, season: 2026 })),
			{ via: 'hotspots', origin: { mode: 'season', season: 2026 } }
		);
		if (!saved || 'problems' in saved) throw new Error(JSON.stringify(saved));
	}, 120_000);

	it('zones and the rest add up to the field, the rest drawn on its own', async () => {
		const s = (await fieldZoneSummary(ctx.actor('manager'), ctx.field.id, 2026))!;
		expect(s.season).toBe(2026);
		expect(s.previousSeason).toBe(2025);
		const zoneRows = s.rows.filter((r) => r.kind === 'zone');
		const rest = s.rows.find((r) => r.kind === 'rest')!;
		const whole = s.rows.find((r) => r.kind === 'field')!;
		expect(zoneRows.length).toBeGreaterThanOrEqual(4);
		// The whole-field row is the field's own season figures (src/lib/server/figures.ts).
		const [own] = figures.bySeason(await figures.listApplications(ctx.actor('manager'), { fieldId: ctx.field.id, season: 2026 }));
		expect(whole.coveredM2).toBeCloseTo(own.coveredM2, 6);
		expect(whole.volumeL).toBeCloseTo(own.volumeL, 6);

		const alone = await restDrawnAlone(ctx, 2026);
		const sum = (pick: (r: (typeof zoneRows)[number]) => number) => zoneRows.reduce((t, r) => t + pick(r), 0);
		// A pixel is 0.01 m²; one on a shared edge can go to both sides or neither.
		expect(Math.abs(sum((r) => r.coveredM2) + alone.coveredM2 - whole.coveredM2)).toBeLessThan(0.5);
		expect(Math.abs(sum((r) => r.sprayedM2) + alone.sprayedM2 - whole.sprayedM2)).toBeLessThan(0.5);
		expect(Math.abs(sum((r) => r.volumeL) + alone.volumeL - whole.volumeL)).toBeLessThan(0.005);
		// So the rest row (field less zones) is the rest drawn alone.
		expect(Math.abs(rest.coveredM2 - alone.coveredM2)).toBeLessThan(0.5);
		expect(Math.abs(rest.sprayedM2 - alone.sprayedM2)).toBeLessThan(0.5);
		// Areas: GeographicLib areas of the zones and the rest add up to the field's.
		expect(sum((r) => r.areaM2) + rest.areaM2).toBeCloseTo(whole.areaM2, 3);
		// Products too, per product.
		for (const p of s.products) {
			const of = (r: (typeof s.rows)[number]) => r.products.find((q) => q.productId === p.id)!;
			expect(zoneRows.reduce((t, r) => t + of(r).appliedUnits, 0) + of(rest).appliedUnits).toBeCloseTo(of(whole).appliedUnits, 9);
			expect(zoneRows.reduce((t, r) => t + (of(r).savedCost ?? NaN), 0) + of(rest).savedCost!).toBeCloseTo(of(whole).savedCost!, 6);
		}
		// The dense patch is where the nozzles fired: its treated share is far above the field's.
		const dense = zoneRows.find((r) => r.name === 'Dense patch')!;
		expect(dense.sharePercent!).toBeGreaterThan(2 * whole.sharePercent!);
		expect(dense.targetRateLPerM2).toBe(0.012);
		// The change against 2025 is there for every row.
		expect(dense.previous).not.toBeNull();
		expect(dense.changePp).toBeCloseTo(dense.sharePercent! - dense.previous!.sharePercent!, 9);
		// The hotspot zones cover the 2026-only patch: hot now, nothing then.
		const newPatch = zoneRows.find((r) => r.name.startsWith('Hot 2026') && r.previous && r.previous.sprayedM2 < 1)!;
		expect(newPatch).toBeDefined();
	});

	it('keeps figures until the shape or the results change', async () => {
		const manager = ctx.actor('manager');
		const before = await db.select({ n: sql<number>`count(*)::int` }).from(zoneResults).innerJoin(zones, eq(zones.id, zoneResults.zoneId)).where(eq(zones.fieldId, ctx.field.id));
		const [zone] = (await listZones(manager, ctx.field.id)).filter((z) => z.name === 'Dense patch');
		const [first] = await db.select().from(zoneResults).where(eq(zoneResults.zoneId, zone.id)).limit(1);
		await fieldZoneSummary(manager, ctx.field.id, 2026);
		const [again] = await db.select().from(zoneResults).where(and(eq(zoneResults.zoneId, zone.id), eq(zoneResults.applicationId, first.applicationId)));
		expect(again.computedAt).toEqual(first.computedAt);
		// A new name keeps them; a new shape does not.
		await updateZone(manager, zone.id, { name: 'Dense patch north' });
		await fieldZoneSummary(manager, ctx.field.id, 2026);
		const [renamed] = await db.select().from(zoneResults).where(and(eq(zoneResults.zoneId, zone.id), eq(zoneResults.applicationId, first.applicationId)));
		expect(renamed.computedAt).toEqual(first.computedAt);
		const smaller = await reshapeZone(manager, zone.id, rect(-118.3135, 47.1221, -118.311, 47.1232));
		expect(smaller && 'ok' in smaller).toBe(true);
		const s = (await fieldZoneSummary(manager, ctx.field.id, 2026))!;
		const [redrawn] = await db.select().from(zoneResults).where(and(eq(zoneResults.zoneId, zone.id), eq(zoneResults.applicationId, first.applicationId)));
		expect(redrawn.zoneGeometryAt).not.toBe(first.zoneGeometryAt);
		const row = s.rows.find((r) => r.id === zone.id)!;
		expect(row.areaM2).toBeCloseTo(areaM2((await listZones(manager, ctx.field.id)).find((z) => z.id === zone.id)!.geometry), 6);
		expect(before[0].n).toBeGreaterThan(0);
		// Processing the log again recomputes its application: the zone is drawn again from it.
		const [app] = await db.select().from(applications).where(and(eq(applications.fieldId, ctx.field.id), eq(applications.season, 2026)));
		const [kept] = await db.select().from(zoneResults).where(and(eq(zoneResults.zoneId, zone.id), eq(zoneResults.applicationId, app.id)));
		await processUpload(db, upload2026.id, async () => {});
		await fieldZoneSummary(manager, ctx.field.id, 2026);
		const [fresh] = await db.select().from(zoneResults).where(and(eq(zoneResults.zoneId, zone.id), eq(zoneResults.applicationId, app.id)));
		expect(fresh.applicationComputedAt).not.toBe(kept.applicationComputedAt);
		expect(fresh.coveredM2).toBeCloseTo(kept.coveredM2, 6);
	});

	it('operators see no money; landlords see only granted fields; other farms see nothing', async () => {
		const op = (await fieldZoneSummary(ctx.actor('operator'), ctx.field.id, 2026))!;
		expect(op.seesMoney).toBe(false);
		expect(op.rows.every((r) => r.products.every((p) => p.savedCost === null && p.appliedCost === null))).toBe(true);
		expect(await fieldZoneSummary(ctx.actor('landlord'), ctx.field.id, 2026)).toBeNull();
		await grant(ctx.farm.id, ctx.people.landlord.id, ctx.field.id);
		const granted = await fieldZoneSummary(ctx.actor('landlord'), ctx.field.id, 2026);
		expect(granted?.seesMoney).toBe(false);
		const other = await makeFarm();
		const stranger: Actor = { user: ctx.people.manager, farm: { id: other.id, slug: other.slug, name: other.name, currency: 'USD' }, role: 'manager' };
		expect(await fieldZoneSummary(stranger, ctx.field.id, 2026)).toBeNull();
		expect(await listZones(stranger, ctx.field.id)).toEqual([]);
	});
});

describe('a zone over the whole field', () => {
	it('equals the field, and leaves a rest of nothing', async () => {
		const ctx = await setUp();
		await processLog(ctx, 'whole.csv', patchyCsv('2026-04-13', 3, true));
		const made = await createZones(ctx.actor('manager'), ctx.field.id, [{ name: 'Everything', geometry: rect(-118.33, 47.11, -118.29, 47.14) }], { via: 'drawn' });
		if (!made || 'problems' in made) throw new Error(JSON.stringify(made));
		expect(made.zones[0].areaM2).toBeCloseTo(ctx.field.areaM2, 3);
		const s = (await fieldZoneSummary(ctx.actor('manager'), ctx.field.id))!;
		const [zone, rest, whole] = s.rows;
		expect(zone.kind).toBe('zone');
		expect(Math.abs(zone.coveredM2 - whole.coveredM2)).toBeLessThan(0.5);
		expect(Math.abs(zone.sprayedM2 - whole.sprayedM2)).toBeLessThan(0.5);
		expect(Math.abs(zone.volumeL - whole.volumeL)).toBeLessThan(0.005);
		expect(zone.sharePercent!).toBeCloseTo(whole.sharePercent!, 3);
		expect(Math.abs(rest.coveredM2)).toBeLessThan(0.5);
		expect(Math.abs(rest.areaM2)).toBeLessThan(0.01);
	}, 60_000);
});

describe('a new field boundary', () => {
	it('cuts the zones to it, and removes a zone left outside', async () => {
		const ctx = await setUp();
		const manager = ctx.actor('manager');
		const made = await createZones(
			manager,
			ctx.field.id,
			[
				{ name: 'East', geometry: rect(-118.305, 47.122, -118.301, 47.125) },
				{ name: 'Far east', geometry: rect(-118.3015, 47.126, -118.3005, 47.127) }
			],
			{ via: 'drawn' }
		);
		if (!made || 'problems' in made) throw new Error('not saved');
		// The field loses its eastern 0.003°.
		const result = await updateBoundary(manager, ctx.field.id, rect(-118.32, 47.12, -118.303, 47.129));
		expect(result && 'ok' in result).toBe(true);
		const left = await listZones(manager, ctx.field.id);
		expect(left.map((z) => z.name)).toEqual(['East']);
		expect(left[0].areaM2).toBeLessThan(made.zones[0].areaM2 * 0.6);
		const [audit] = await db.select({ detail: auditLog.detail }).from(auditLog).where(and(eq(auditLog.targetId, ctx.field.id), eq(auditLog.action, 'field.boundary_edited')));
		expect((audit.detail as { zonesCut: { name: string; areaM2After: number }[] }).zonesCut.map((z) => [z.name, z.areaM2After > 0])).toEqual([
			['East', true],
			['Far east', false]
		]);
	});
});

describe('saving zones', () => {
	it('is all or nothing, names each problem, and is audited', async () => {
		const ctx = await setUp();
		const agronomist = ctx.actor('agronomist');
		const bad = await createZones(
			agronomist,
			ctx.field.id,
			[
				{ name: 'A', geometry: rect(-118.31, 47.122, -118.309, 47.123) },
				{ name: 'a', geometry: rect(-118.308, 47.122, -118.307, 47.123) },
				{ name: 'Far away', geometry: rect(-117, 46, -116.99, 46.01) },
				{ name: 'Crossed', geometry: { type: 'Polygon', coordinates: [[[-118.31, 47.12], [-118.305, 47.125], [-118.305, 47.12], [-118.31, 47.125], [-118.31, 47.12]]] } },
				{ name: 'Too high', geometry: rect(-118.306, 47.122, -118.305, 47.123), targetRateLPerM2: 0.5 }
			],
			{ via: 'imported', origin: { file: 'zones.geojson' } }
		);
		expect(bad && 'problems' in bad).toBe(true);
		const problems = (bad as { problems: { index: number; message: string }[] }).problems;
		expect(problems.map((p) => p.index)).toEqual([1, 2, 3, 4]);
		expect(problems[0].message).toContain('also the name of zone 1');
		expect(problems[1].message).toContain('outside the field');
		expect(problems[2].message).toContain('crosses itself');
		expect(problems[3].message).toContain('above 1000 L/ha');
		expect(await listZones(agronomist, ctx.field.id)).toEqual([]);

		const ok = await createZones(agronomist, ctx.field.id, [{ name: 'A', geometry: rect(-118.31, 47.122, -118.309, 47.123) }], { via: 'drawn' });
		if (!ok || 'problems' in ok) throw new Error('not saved');
		const again = await createZones(agronomist, ctx.field.id, [{ name: ' a ', geometry: rect(-118.308, 47.122, -118.307, 47.123) }], { via: 'drawn' });
		expect(again && 'problems' in again && again.problems[0].message).toContain('already exists');
		const id = ok.zones[0].id;
		expect(await updateZone(agronomist, id, { description: 'x'.repeat(2001) })).toEqual({ error: 'Use at most 2000 characters for the description.' });
		expect(await updateZone(agronomist, id, { targetRateLPerM2: 0.015, description: 'Residual programme' })).toEqual({ ok: true });
		expect(await removeZone(agronomist, id)).toBe(true);
		const audit = await db.select({ action: auditLog.action }).from(auditLog).where(and(eq(auditLog.farmId, ctx.farm.id), eq(auditLog.targetId, id)));
		expect(audit.map((a) => a.action).sort()).toEqual(['zone.created', 'zone.deleted', 'zone.edited']);
		// Operators and landlords may not change zones, whatever calls the data functions.
		await expect(createZones(ctx.actor('operator'), ctx.field.id, [{ name: 'B', geometry: rect(-118.31, 47.122, -118.309, 47.123) }], { via: 'drawn' })).rejects.toThrow(/may not edit zones/);
	});
});
