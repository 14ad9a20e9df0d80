// The savings report: chemical saved per field, season and product, and the farm's totals.
// Amounts come from each application's product figures (chemicalSaved in ./savings.ts: the mix
// is made at the broadcast concentration, so product scales with the liquid used); money is
// the amount times the product's catalogue price, so a price change shows in every season.

export type ProductUnit = 'L' | 'kg';

/** One application as the report needs it: where, when, what was driven over, and per product the amounts. */
export type SavingsApplication = {
	fieldId: string;
	fieldName: string;
	season: number;
	/** Area the boom drove over in this application, m2. */
	coveredM2: number;
	products: { productId: string; appliedUnits: number; broadcastUnits: number }[];
};

export type CatalogueProduct = { name: string; unit: ProductUnit; /** Per L or kg; null when the catalogue has no price. */ pricePerUnit: number | null };

export type SavingsRow = {
	season: number;
	fieldId: string;
	fieldName: string;
	productId: string;
	productName: string;
	unit: ProductUnit;
	pricePerUnit: number | null;
	/** Applications of this field and season whose tank mix held the product. */
	applications: number;
	/** Area driven over by those applications, each counted, m2. */
	coveredM2: number;
	/** Product a broadcast pass over the same covered area would have used (label rate x area), L or kg. */
	broadcastUnits: number;
	appliedUnits: number;
	savedUnits: number;
	/** 0..100; null when nothing was covered. */
	percentSaved: number | null;
	broadcastCost: number | null;
	appliedCost: number | null;
	savedCost: number | null;
	/** Money per m2 driven over: what was applied, and what was saved. */
	appliedCostPerM2: number | null;
	savedCostPerM2: number | null;
};

export type ProductTotal = Omit<SavingsRow, 'season' | 'fieldId' | 'fieldName'> & { fields: number };

export type SavingsTotals = {
	/** One per product, by name. */
	products: ProductTotal[];
	/** Sums over the rows whose product has a price. */
	broadcastCost: number;
	appliedCost: number;
	savedCost: number;
	/** Products in the rows without a catalogue price: their money is left out of the sums. */
	unpriced: string[];
};

const money = (units: number, price: number | null) => (price === null ? null : units * price);
const perM2 = (cost: number | null, m2: number) => (cost === null || !(m2 > 0) ? null : cost / m2);
const percent = (saved: number, broadcast: number) => (broadcast > 0 ? (100 * saved) / broadcast : null);

function withMoney<T extends { broadcastUnits: number; appliedUnits: number; coveredM2: number; pricePerUnit: number | null }>(r: T) {
	const savedUnits = r.broadcastUnits - r.appliedUnits;
	const appliedCost = money(r.appliedUnits, r.pricePerUnit);
	const savedCost = money(savedUnits, r.pricePerUnit);
	return {
		...r,
		savedUnits,
		percentSaved: percent(savedUnits, r.broadcastUnits),
		broadcastCost: money(r.broadcastUnits, r.pricePerUnit),
		appliedCost,
		savedCost,
		appliedCostPerM2: perM2(appliedCost, r.coveredM2),
		savedCostPerM2: perM2(savedCost, r.coveredM2)
	};
}

/**
 * Rows per season, field and product, newest season first, then field and product by name.
 * A product missing from `catalogue` is a contract breach (the applications came from it).
 */
export function savingsRows(applications: SavingsApplication[], catalogue: Map<string, CatalogueProduct>): SavingsRow[] {
	type Sum = { season: number; fieldId: string; fieldName: string; productId: string; applications: number; coveredM2: number; broadcastUnits: number; appliedUnits: number };
	const sums = new Map<string, Sum>();
	for (const a of applications) {
		for (const p of a.products) {
			const key = `${a.season}|${a.fieldId}|${p.productId}`;
			let s = sums.get(key);
			if (!s) {
				s = { season: a.season, fieldId: a.fieldId, fieldName: a.fieldName, productId: p.productId, applications: 0, coveredM2: 0, broadcastUnits: 0, appliedUnits: 0 };
				sums.set(key, s);
			}
			s.applications += 1;
			s.coveredM2 += a.coveredM2;
			s.broadcastUnits += p.broadcastUnits;
			s.appliedUnits += p.appliedUnits;
		}
	}
	const collator = new Intl.Collator('en', { numeric: true });
	return [...sums.values()]
		.map((s) => {
			const product = catalogue.get(s.productId);
			if (!product) throw new Error(`savingsRows: product ${s.productId} is not in the catalogue given`);
			return withMoney({ ...s, productName: product.name, unit: product.unit, pricePerUnit: product.pricePerUnit });
		})
		.sort((a, b) => b.season - a.season || collator.compare(a.fieldName, b.fieldName) || collator.compare(a.productName, b.productName));
}

/** The farm's totals over some rows: per product (amounts add only within a product) and money. */
export function savingsTotals(rows: SavingsRow[]): SavingsTotals {
	const byProduct = new Map<string, { r: SavingsRow; applications: number; coveredM2: number; broadcastUnits: number; appliedUnits: number; fields: Set<string> }>();
	for (const r of rows) {
		const t = byProduct.get(r.productId) ?? { r, applications: 0, coveredM2: 0, broadcastUnits: 0, appliedUnits: 0, fields: new Set<string>() };
		t.applications += r.applications;
		t.coveredM2 += r.coveredM2;
		t.broadcastUnits += r.broadcastUnits;
		t.appliedUnits += r.appliedUnits;
		t.fields.add(r.fieldId);
		byProduct.set(r.productId, t);
	}
	const products: ProductTotal[] = [...byProduct.values()]
		.map((t) =>
			withMoney({
				productId: t.r.productId,
				productName: t.r.productName,
				unit: t.r.unit,
				pricePerUnit: t.r.pricePerUnit,
				applications: t.applications,
				coveredM2: t.coveredM2,
				broadcastUnits: t.broadcastUnits,
				appliedUnits: t.appliedUnits,
				fields: t.fields.size
			})
		)
		.sort((a, b) => a.productName.localeCompare(b.productName));
	const sum = (key: 'broadcastCost' | 'appliedCost' | 'savedCost') => products.reduce((s, p) => s + (p[key] ?? 0), 0);
	return {
		products,
		broadcastCost: sum('broadcastCost'),
		appliedCost: sum('appliedCost'),
		savedCost: sum('savedCost'),
		unpriced: products.filter((p) => p.pricePerUnit === null).map((p) => p.productName)
	};
}

/** Money saved per field (all products with a price), for the per-field view and its checks. */
export function savedCostByField(rows: SavingsRow[]): Map<string, number> {
	const out = new Map<string, number>();
	for (const r of rows) out.set(r.fieldId, (out.get(r.fieldId) ?? 0) + (r.savedCost ?? 0));
	return out;
}

export type SavingsFilter = { season?: number | null; fieldId?: string | null; productId?: string | null };

export function filterRows(rows: SavingsRow[], { season, fieldId, productId }: SavingsFilter): SavingsRow[] {
	return rows.filter((r) => (season == null || r.season === season) && (!fieldId || r.fieldId === fieldId) && (!productId || r.productId === productId));
}

export type SortKey = 'season' | 'field' | 'product' | 'covered' | 'broadcast' | 'applied' | 'saved' | 'percent' | 'savedCost' | 'appliedPerArea' | 'savedPerArea';

/**
 * Rows in a column's order. Amounts of different products are compared as numbers in their own
 * unit (a column mixes L and kg); missing money sorts last either way.
 */
export function sortRows(rows: SavingsRow[], key: SortKey, ascending: boolean): SavingsRow[] {
	const collator = new Intl.Collator('en', { numeric: true });
	const value = (r: SavingsRow): number | string | null => {
		switch (key) {
			case 'season': return r.season;
			case 'field': return r.fieldName;
			case 'product': return r.productName;
			case 'covered': return r.coveredM2;
			case 'broadcast': return r.broadcastUnits;
			case 'applied': return r.appliedUnits;
			case 'saved': return r.savedUnits;
			case 'percent': return r.percentSaved;
			case 'savedCost': return r.savedCost;
			case 'appliedPerArea': return r.appliedCostPerM2;
			case 'savedPerArea': return r.savedCostPerM2;
		}
	};
	return [...rows].sort((a, b) => {
		const x = value(a), y = value(b);
		if (x === null || y === null) return x === y ? 0 : x === null ? 1 : -1;
		const order = typeof x === 'string' ? collator.compare(x, y as string) : x - (y as number);
		return (ascending ? order : -order) || collator.compare(a.fieldName, b.fieldName) || b.season - a.season;
	});
}
