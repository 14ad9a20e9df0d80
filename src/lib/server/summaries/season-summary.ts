// A field's season summary, read-only, for its landlords (and for managers, to preview what a
// landlord sees). Every figure comes from what the app already computes: the applications and
// product amounts of figures.listApplications, the savings table's rows and totals
// (savingsRows/savingsTotals, as the savings page), the sprayed share and chemical saved of the
// field's year over year (seasonShares), and the small multiple of the field page drawn larger.
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import { applications, landlordGrants, products, users } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import * as figures from '$lib/server/figures';
import * as fieldsData from '$lib/server/fields';
import { seasonShares, smallMultiples } from '$lib/server/field-trend';
import { savingsApplications } from '$lib/server/savings';
import type { Field } from '$lib/server/db/schema';
import { savingsRows, savingsTotals, type CatalogueProduct, type SavingsRow } from '$lib/compute/savings-table';
import { landlordShare, leaseOf, type Lease } from '$lib/compute/landlord-share';
import { percentOfFieldSprayed } from '$lib/compute/of-field';
import { fieldMapSvg, type FieldMapSvg } from '$lib/map/field-map-svg';

export type LeaseShare = { userId: string; name: string; lease: Lease; share: number | null };

export type FieldSeasonSummary = {
	field: { id: string; name: string; areaM2: number };
	season: number;
	applications: { id: string; day: string; tankMixName: string; coveredM2: number; sprayedM2: number; volumeL: number }[];
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
	/** Sprayed area over field area × applications (the season table's "Of field"), 0..100. */
	percentOfField: number | null;
	/** Sprayed over covered area, as the field's year over year gives it, 0..100. */
	sprayedPercent: number | null;
	/** Liquid (and so product) saved against broadcast, as the field's year over year gives it, 0..100. */
	savedPercent: number | null;
	/** Per product: as the savings page's rows for this field and season (money only where the role sees cost). */
	products: SavingsRow[];
	/** Herbicide applied at catalogue prices (products with a price); null for roles that see no cost. */
	herbicideCost: number | null;
	/** Money saved against broadcast at catalogue prices; null for roles that see no cost. */
	savedCost: number | null;
	/** Products without a catalogue price: left out of the money. */
	unpriced: string[];
	/** The landlord's own lease (landlord viewer) or every landlord's (manager preview). */
	leases: LeaseShare[];
};

/** Seasons with applications on the fields the actor may see, newest first. */
export async function summarySeasons(actor: Actor): Promise<number[]> {
	const conditions = [eq(applications.farmId, actor.farm.id)];
	if (actor.role === 'landlord') conditions.push(inArray(applications.fieldId, fieldsData.visibleFieldIds(actor)));
	const rows = await db.selectDistinct({ season: applications.season }).from(applications).where(and(...conditions)).orderBy(desc(applications.season));
	return rows.map((r) => r.season);
}

/** The season asked for in the URL when it has applications, else the latest (null: none at all). */
export function pickSeason(seasons: number[], asked: string | null): number | null {
	const n = Number(asked);
	return asked !== null && seasons.includes(n) ? n : (seasons[0] ?? null);
}

/** Catalogue prices for the summary: the farm's, for roles that see herbicide cost; none otherwise. */
async function catalogue(actor: Actor): Promise<Map<string, CatalogueProduct>> {
	const seesCost = may(actor.role, 'summaries.cost');
	const rows = await db.select({ id: products.id, name: products.name, unit: products.unit, pricePerUnit: products.pricePerUnit }).from(products).where(eq(products.farmId, actor.farm.id));
	return new Map(rows.map((p) => [p.id, { name: p.name, unit: p.unit, pricePerUnit: seesCost ? (p.pricePerUnit ?? null) : null }]));
}

/** Who holds this field on what lease: the landlord's own grant, or (managers) every landlord's. */
async function leasesOf(actor: Actor, fieldIds: string[]): Promise<Map<string, Omit<LeaseShare, 'share'>[]>> {
	const out = new Map<string, Omit<LeaseShare, 'share'>[]>();
	if (!fieldIds.length || !(actor.role === 'landlord' || may(actor.role, 'grants.manage'))) return out;
	const conditions = [eq(landlordGrants.farmId, actor.farm.id), inArray(landlordGrants.fieldId, fieldIds)];
	if (actor.role === 'landlord') conditions.push(eq(landlordGrants.userId, actor.user.id));
	// Only people who are still landlords of the farm (a grant outlives a changed role).
	const rows = await db
		.select({ fieldId: landlordGrants.fieldId, userId: users.id, name: users.name, cropSharePercent: landlordGrants.cropSharePercent })
		.from(landlordGrants)
		.innerJoin(users, eq(users.id, landlordGrants.userId))
		.where(and(...conditions, sql`exists (select 1 from memberships m where m.farm_id = ${actor.farm.id} and m.user_id = ${landlordGrants.userId} and m.role = 'landlord')`))
		.orderBy(users.name);
	for (const r of rows) {
		const list = out.get(r.fieldId) ?? [];
		list.push({ userId: r.userId, name: r.name, lease: leaseOf(r.cropSharePercent) });
		out.set(r.fieldId, list);
	}
	return out;
}

type FieldRow = { id: string; name: string; areaM2: number };

async function summarise(actor: Actor, field: FieldRow, season: number, prices: Map<string, CatalogueProduct>, leases: Omit<LeaseShare, 'share'>[]): Promise<FieldSeasonSummary> {
	const apps = await figures.listApplications(actor, { fieldId: field.id, season });
	const shares = (await seasonShares(actor, field)).find((s) => s.season === season);
	const rows = savingsRows(savingsApplications(apps), prices);
	const totals = savingsTotals(rows);
	const seesCost = may(actor.role, 'summaries.cost');
	const priced = rows.some((r) => r.pricePerUnit !== null);
	const herbicideCost = seesCost && priced ? totals.appliedCost : null;
	const sum = (k: 'coveredM2' | 'sprayedM2' | 'volumeL') => apps.reduce((s, a) => s + a[k], 0);
	return {
		field: { id: field.id, name: field.name, areaM2: field.areaM2 },
		season,
		applications: apps
			.map((a) => ({ id: a.id, day: a.day, tankMixName: a.tankMixName, coveredM2: a.coveredM2, sprayedM2: a.sprayedM2, volumeL: a.volumeL }))
			.sort((a, b) => a.day.localeCompare(b.day)),
		coveredM2: sum('coveredM2'),
		sprayedM2: sum('sprayedM2'),
		volumeL: sum('volumeL'),
		percentOfField: percentOfFieldSprayed(sum('sprayedM2'), field.areaM2, apps.length),
		sprayedPercent: shares?.sprayedPercent ?? null,
		savedPercent: shares?.savedPercent ?? null,
		products: rows,
		herbicideCost,
		savedCost: seesCost && priced ? totals.savedCost : null,
		unpriced: seesCost ? totals.unpriced : [],
		leases: leases.map((l) => ({ ...l, share: landlordShare(herbicideCost, l.lease) }))
	};
}

/** One field's summary; `field` must be one the actor may see (fields.get). */
export async function fieldSummary(actor: Actor, field: FieldRow, season: number): Promise<FieldSeasonSummary> {
	const [prices, leases] = await Promise.all([catalogue(actor), leasesOf(actor, [field.id])]);
	return summarise(actor, field, season, prices, leases.get(field.id) ?? []);
}

/** Every field the actor may see (landlords: granted fields only), by name. */
export async function seasonSummaries(actor: Actor, season: number): Promise<FieldSeasonSummary[]> {
	const visible = await fieldsData.list(actor);
	const [prices, leases] = await Promise.all([catalogue(actor), leasesOf(actor, visible.map((f) => f.id))]);
	const out: FieldSeasonSummary[] = [];
	for (const f of visible) out.push(await summarise(actor, f, season, prices, leases.get(f.id) ?? []));
	return out;
}

/** The field's map in that season: the field page's small multiple, larger (one block per cell up to 200 across). */
export async function fieldMap(actor: Actor, field: Field, season: number, options: { withText?: boolean; maxWidthPx?: number; maxHeightPx?: number } = {}): Promise<FieldMapSvg & { span: number; cellSizeM: number }> {
	const { span, maps } = await smallMultiples(actor, field, [season], { maxBlocks: 200 });
	const blockM = field.gridCellM * span;
	return {
		...fieldMapSvg(maps[0], { blockM, units: actor.user.units, title: `${field.name}, ${season}: treated share`, ...options }),
		span,
		cellSizeM: field.gridCellM
	};
}
