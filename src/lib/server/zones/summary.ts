// Zone summaries: each zone's figures per application, drawn from the application's stored fixes
// over the zone's exact shape and kept in zone_results until the shape or the application's
// results change; then summed per season with products and money (src/lib/compute/zone-summary.ts).
import { and, eq, inArray, sql } from 'drizzle-orm';
import type { MultiPolygon, Polygon } from 'geojson';
import { summariseZone } from '$lib/compute/coverage';
import { summariseZones, type ApplicationInput, type Area3, type ZoneSummary } from '$lib/compute/zone-summary';
import { projectRings } from '$lib/geo/projection';
import { db } from '$lib/server/db';
import { applicationFixes, applications, machines, products, tankMixProducts, tankMixes, zoneResults, zones } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import * as fieldData from '$lib/server/fields';
import { concatFixes, unpackFixes } from '$lib/server/ingest/pack';
import { coverageInput } from '$lib/server/ingest/process-upload';
import { listZones } from './zones';

type ZoneShape = { id: string; geometry: Polygon | MultiPolygon; geometryAt: string };

/**
 * Every zone's figures from every application given, from zone_results where still current,
 * otherwise drawn now (all missing zones of an application in one pass over its fixes) and kept.
 */
export async function zoneParts(field: fieldData.Field, zoneIds: string[], applicationIds: string[]): Promise<Map<string, Map<string, Area3>>> {
	const out = new Map<string, Map<string, Area3>>(zoneIds.map((id) => [id, new Map()]));
	if (zoneIds.length === 0 || applicationIds.length === 0) return out;
	// Current rows only: made from the zone's present shape and the application's present results.
	const current = await db
		.select({ zoneId: zoneResults.zoneId, applicationId: zoneResults.applicationId, coveredM2: zoneResults.coveredM2, sprayedM2: zoneResults.sprayedM2, volumeL: zoneResults.volumeL })
		.from(zoneResults)
		.innerJoin(zones, and(eq(zones.id, zoneResults.zoneId), sql`${zones.geometryUpdatedAt} = ${zoneResults.zoneGeometryAt}`))
		.innerJoin(applications, and(eq(applications.id, zoneResults.applicationId), sql`${applications.computedAt} = ${zoneResults.applicationComputedAt}`))
		.where(and(inArray(zoneResults.zoneId, zoneIds), inArray(zoneResults.applicationId, applicationIds)));
	for (const r of current) out.get(r.zoneId)!.set(r.applicationId, r);

	const shapes: ZoneShape[] = await db
		.select({ id: zones.id, geometry: zones.geometry, geometryAt: sql<string>`${zones.geometryUpdatedAt}::text` })
		.from(zones)
		.where(and(inArray(zones.id, zoneIds), eq(zones.fieldId, field.id)));
	for (const applicationId of applicationIds) {
		const missing = shapes.filter((z) => !out.get(z.id)!.has(applicationId));
		if (missing.length === 0) continue;
		const drawn = await drawZones(field, applicationId, missing);
		for (const [zoneId, figures] of drawn) out.get(zoneId)!.set(applicationId, figures);
	}
	return out;
}

/** Draws zones over one application's fixes and stores the figures with the stamps they came from. */
async function drawZones(field: fieldData.Field, applicationId: string, shapes: ZoneShape[]): Promise<Map<string, Area3>> {
	const [app] = await db
		.select({
			computedAt: sql<string>`${applications.computedAt}::text`,
			boomWidthM: machines.boomWidthM,
			nozzleCount: machines.nozzleCount,
			nozzleSpacingM: machines.nozzleSpacingM,
			carrierRateLPerM2: tankMixes.carrierRateLPerM2
		})
		.from(applications)
		.leftJoin(machines, eq(machines.id, applications.machineId))
		.innerJoin(tankMixes, eq(tankMixes.id, applications.tankMixId))
		.where(and(eq(applications.id, applicationId), eq(applications.fieldId, field.id)));
	if (!app) throw new Error(`zone figures: application ${applicationId} is not in field ${field.id}`);
	if (app.boomWidthM === null || app.nozzleCount === null || app.nozzleSpacingM === null) {
		throw new ZoneFiguresProblem('The machine of an application in this season was deleted, so its zone figures cannot be drawn. Process its log again with a machine.');
	}
	const parts = await db.select({ packed: applicationFixes.packed }).from(applicationFixes).where(eq(applicationFixes.applicationId, applicationId));
	const out = new Map<string, Area3>();
	if (parts.length === 0) return out;
	const fixes = concatFixes(parts.map((p) => unpackFixes(p.packed)));
	const input = coverageInput(field, fixes, { boomWidthM: app.boomWidthM, nozzleCount: app.nozzleCount, nozzleSpacingM: app.nozzleSpacingM });
	const rows = shapes.map((z) => {
		const { totals } = summariseZone(input, projectRings(field.gridProj, z.geometry), { defaultRateLPerM2: app.carrierRateLPerM2 });
		const figures = { coveredM2: totals.coveredM2, sprayedM2: totals.sprayedM2, volumeL: totals.volumeL };
		out.set(z.id, figures);
		return { zoneId: z.id, applicationId, zoneGeometryAt: z.geometryAt, applicationComputedAt: app.computedAt, ...figures };
	});
	await db
		.insert(zoneResults)
		.values(rows)
		.onConflictDoUpdate({
			target: [zoneResults.zoneId, zoneResults.applicationId],
			set: {
				zoneGeometryAt: sql`excluded.zone_geometry_at`,
				applicationComputedAt: sql`excluded.application_computed_at`,
				coveredM2: sql`excluded.covered_m_2`,
				sprayedM2: sql`excluded.sprayed_m_2`,
				volumeL: sql`excluded.volume_l`,
				computedAt: sql`now()`
			}
		});
	return out;
}

/** Something the user can act on; its message is shown as it is. */
export class ZoneFiguresProblem extends Error {}

/** The field's applications with their tank mix products (prices only for those who may see them). */
async function applicationInputs(actor: Actor, fieldId: string): Promise<ApplicationInput[]> {
	const rows = await db
		.select({
			id: applications.id,
			season: applications.season,
			tankMixId: applications.tankMixId,
			coveredM2: applications.coveredM2,
			sprayedM2: applications.sprayedM2,
			volumeL: applications.volumeL,
			carrierRateLPerM2: tankMixes.carrierRateLPerM2
		})
		.from(applications)
		.innerJoin(tankMixes, eq(tankMixes.id, applications.tankMixId))
		.where(and(eq(applications.farmId, actor.farm.id), eq(applications.fieldId, fieldId)));
	const mixIds = [...new Set(rows.map((r) => r.tankMixId))];
	const rates = mixIds.length
		? await db
				.select({ tankMixId: tankMixProducts.tankMixId, id: products.id, name: products.name, unit: products.unit, ratePerM2: tankMixProducts.ratePerM2, pricePerUnit: products.pricePerUnit })
				.from(tankMixProducts)
				.innerJoin(products, eq(products.id, tankMixProducts.productId))
				.where(inArray(tankMixProducts.tankMixId, mixIds))
		: [];
	const seesPrices = may(actor.role, 'prices.view');
	return rows.map(({ tankMixId, ...r }) => ({
		...r,
		products: rates
			.filter((p) => p.tankMixId === tankMixId)
			.map((p) => ({ id: p.id, name: p.name, unit: p.unit, ratePerM2: p.ratePerM2, pricePerUnit: seesPrices ? p.pricePerUnit : null }))
	}));
}

export type FieldZoneSummary = ZoneSummary & { fieldId: string; fieldName: string; seasons: number[]; seesMoney: boolean };

/**
 * The zone table of a field the actor may see, for a season (default: the latest with data) and
 * with the previous season for the change; null when the field is not visible.
 */
export async function fieldZoneSummary(actor: Actor, fieldId: string, season?: number): Promise<FieldZoneSummary | null> {
	const field = await fieldData.get(actor, fieldId);
	if (!field) return null;
	const [zoneList, apps] = await Promise.all([listZones(actor, fieldId), applicationInputs(actor, fieldId)]);
	const seasons = [...new Set(apps.map((a) => a.season))].sort((a, b) => b - a);
	const chosen = season !== undefined && seasons.includes(season) ? season : (seasons[0] ?? season ?? new Date().getUTCFullYear());
	const previous = seasons.find((s) => s < chosen);
	const used = apps.filter((a) => a.season === chosen || a.season === previous);
	const parts = await zoneParts(field, zoneList.map((z) => z.id), used.map((a) => a.id));
	const summary = summariseZones({
		season: chosen,
		fieldAreaM2: field.areaM2,
		zones: zoneList.map((z) => ({ id: z.id, name: z.name, areaM2: z.areaM2, targetRateLPerM2: z.targetRateLPerM2 })),
		applications: used,
		zoneParts: parts
	});
	return { ...summary, fieldId: field.id, fieldName: field.name, seasons, seesMoney: may(actor.role, 'prices.view') };
}
