// The savings report for managers: every application's product amounts (figures.listApplications,
// which uses chemicalSaved) summed per season, field and product, priced from the catalogue.
import { error } from '@sveltejs/kit';
import { mayOpen, type Actor } from '$lib/server/auth/guard';
import * as catalogue from '$lib/server/catalogue';
import * as figures from '$lib/server/figures';
import { filterRows, savedCostByField, savingsRows, savingsTotals, type CatalogueProduct, type SavingsApplication, type SavingsFilter, type SavingsRow, type SavingsTotals } from '$lib/compute/savings-table';

export type SavingsReport = {
	/** Seasons with applications, newest first. */
	seasons: number[];
	fields: { id: string; name: string }[];
	products: { id: string; name: string; unit: 'L' | 'kg' }[];
	/** Rows after the filter, newest season first. */
	rows: SavingsRow[];
	totals: SavingsTotals;
	/** Money saved per season over every field and product (unfiltered), newest first. */
	bySeason: { season: number; savedCost: number; broadcastCost: number; appliedCost: number; unpriced: string[] }[];
	/** Money saved per field in each season (unfiltered; null where the field had no application), by name. */
	byField: { fieldId: string; fieldName: string; seasons: Record<number, number | null>; savedCost: number }[];
};

/** Every row the actor may see, before any filter. Managers only: the report is all prices. */
export async function allRows(actor: Actor): Promise<SavingsRow[]> {
	// Routes check this first; the data layer refuses on its own so no caller can forget.
	if (!mayOpen(actor.role, 'savings')) error(403, 'Your role in this farm does not give access to savings.');
	const [applications, products] = await Promise.all([figures.listApplications(actor), catalogue.listProducts(actor)]);
	const prices = new Map<string, CatalogueProduct>(
		products.map((p) => [p.id, { name: p.name, unit: p.unit, pricePerUnit: p.pricePerUnit ?? null }])
	);
	return savingsRows(savingsApplications(applications), prices);
}

/** Applications as the savings table reads them (the season summary reads them the same way). */
export function savingsApplications(applications: Awaited<ReturnType<typeof figures.listApplications>>): SavingsApplication[] {
	return applications.map((a) => ({
		fieldId: a.fieldId,
		fieldName: a.fieldName,
		season: a.season,
		coveredM2: a.coveredM2,
		products: a.products.map((p, i) => ({ productId: a.productIds[i], appliedUnits: p.appliedUnits, broadcastUnits: p.broadcastUnits }))
	}));
}

export async function report(actor: Actor, filter: SavingsFilter): Promise<SavingsReport> {
	const rows = await allRows(actor);
	const seasons = [...new Set(rows.map((r) => r.season))].sort((a, b) => b - a);
	const byName = <T extends { name: string }>(list: T[]) => list.sort((a, b) => a.name.localeCompare(b.name));
	const fields = byName([...new Map(rows.map((r) => [r.fieldId, { id: r.fieldId, name: r.fieldName }])).values()]);
	const products = byName([...new Map(rows.map((r) => [r.productId, { id: r.productId, name: r.productName, unit: r.unit }])).values()]);
	const filtered = filterRows(rows, filter);
	return {
		seasons,
		fields,
		products,
		rows: filtered,
		totals: savingsTotals(filtered),
		bySeason: seasons.map((season) => {
			const t = savingsTotals(rows.filter((r) => r.season === season));
			return { season, savedCost: t.savedCost, broadcastCost: t.broadcastCost, appliedCost: t.appliedCost, unpriced: t.unpriced };
		}),
		byField: fields.map((f) => {
			const own = rows.filter((r) => r.fieldId === f.id);
			const perSeason = Object.fromEntries(
				seasons.map((season) => {
					const inSeason = own.filter((r) => r.season === season);
					return [season, inSeason.length ? (savedCostByField(inSeason).get(f.id) ?? 0) : null];
				})
			);
			return { fieldId: f.id, fieldName: f.name, seasons: perSeason, savedCost: savedCostByField(own).get(f.id) ?? 0 };
		})
	};
}

export type ParsedFilter = { filter: SavingsFilter; problems: string[] };

/**
 * The filter in a URL (?season=2025&field=<id>&product=<id>), checked against what the report
 * holds: a value that names nothing is dropped with a sentence saying so, never an error page.
 * Without a season the latest is shown; season=all shows every season.
 */
export function parseFilter(params: URLSearchParams, known: { seasons: number[]; fields: { id: string; name: string }[]; products: { id: string }[] }): ParsedFilter {
	const problems: string[] = [];
	const filter: SavingsFilter = {};
	const season = params.get('season');
	if (season === null) {
		if (known.seasons.length) filter.season = known.seasons[0];
	} else if (season !== 'all') {
		const n = Number(season);
		if (Number.isInteger(n) && known.seasons.includes(n)) filter.season = n;
		else problems.push(`Season “${season}” has no applications; showing every season.`);
	}
	const field = params.get('field');
	if (field && field !== 'all') {
		if (known.fields.some((f) => f.id === field)) filter.fieldId = field;
		else problems.push('The field asked for has no applications in this farm; showing every field.');
	}
	const product = params.get('product');
	if (product && product !== 'all') {
		if (known.products.some((p) => p.id === product)) filter.productId = product;
		else problems.push('The product asked for was not used in this farm; showing every product.');
	}
	return { filter, problems };
}

/** The report for a URL's filter: the filter is checked against the unfiltered report first. */
export async function reportFor(actor: Actor, params: URLSearchParams) {
	const unfiltered = await report(actor, {});
	const { filter, problems } = parseFilter(params, unfiltered);
	const rows = filterRows(unfiltered.rows, filter);
	return { ...unfiltered, rows, totals: savingsTotals(rows), filter, problems };
}
