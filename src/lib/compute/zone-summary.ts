// A field's season split into its zones and the rest of the field. Zone figures come from the
// application's fixes drawn over each zone's exact shape (src/lib/compute/coverage.ts,
// summariseZone), the same bit raster as the field's own figures. Zones lie inside the field
// and do not overlap (src/lib/geo/zones.ts), so on the field's pixel lattice every pixel belongs to
// one zone or to the rest: the rest is the field's figures less the zones', which equals drawing
// the rest as its own region (tested in src/lib/server/zones/summary.test.ts) without drawing the
// whole field again. Product and money follow each application's tank mix as in figures.ts.
import { chemicalSaved, type Savings } from './savings';

export type ProductInput = { id: string; name: string; unit: 'L' | 'kg'; ratePerM2: number; pricePerUnit: number | null };

export type ApplicationInput = {
	id: string;
	season: number;
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
	carrierRateLPerM2: number;
	products: ProductInput[];
};

export type Area3 = { coveredM2: number; sprayedM2: number; volumeL: number };

export type ZoneInput = { id: string; name: string; areaM2: number; targetRateLPerM2: number | null };

export type ProductFigures = Savings & { productId: string; name: string; unit: 'L' | 'kg' };

export type RowFigures = {
	applications: number;
	areaM2: number;
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
	/** Sprayed over covered, percent; null where nothing was covered. */
	sharePercent: number | null;
	products: ProductFigures[];
};

export type SummaryRow = RowFigures & {
	kind: 'zone' | 'rest' | 'field';
	id: string;
	name: string;
	targetRateLPerM2: number | null;
	/** The same row in the previous season, when there is one. */
	previous: RowFigures | null;
	/** Treated share now less then, percentage points. */
	changePp: number | null;
};

export type ZoneSummary = {
	season: number;
	previousSeason: number | null;
	products: { id: string; name: string; unit: 'L' | 'kg' }[];
	/** Zones by name, then the rest of the field, then the whole field (the totals). */
	rows: SummaryRow[];
};

function empty(areaM2: number): RowFigures {
	return { applications: 0, areaM2, coveredM2: 0, sprayedM2: 0, volumeL: 0, sharePercent: null, products: [] };
}

function addProducts(into: Map<string, ProductFigures>, app: ApplicationInput, part: Area3) {
	for (const p of app.products) {
		const s = chemicalSaved(
			{ volumeL: part.volumeL, coveredM2: part.coveredM2, carrierRateLPerM2: app.carrierRateLPerM2 },
			{ ratePerM2: p.ratePerM2, pricePerUnit: p.pricePerUnit ?? undefined }
		);
		const sum = into.get(p.id);
		if (!sum) {
			into.set(p.id, { productId: p.id, name: p.name, unit: p.unit, ...s });
			continue;
		}
		const add = (x: number | null, y: number | null) => (x === null || y === null ? null : x + y);
		sum.appliedUnits += s.appliedUnits;
		sum.broadcastUnits += s.broadcastUnits;
		sum.savedUnits += s.savedUnits;
		sum.appliedCost = add(sum.appliedCost, s.appliedCost);
		sum.broadcastCost = add(sum.broadcastCost, s.broadcastCost);
		sum.savedCost = add(sum.savedCost, s.savedCost);
	}
}

function finish(f: RowFigures, products: Map<string, ProductFigures>): RowFigures {
	const list = [...products.values()].map((p) => ({ ...p, percentSaved: p.broadcastUnits > 0 ? (100 * p.savedUnits) / p.broadcastUnits : null }));
	return { ...f, sharePercent: f.coveredM2 > 0 ? (100 * f.sprayedM2) / f.coveredM2 : null, products: list };
}

/** Sum of the parts of the season's applications: a zone's, or the whole field's. */
function sumOver(apps: ApplicationInput[], areaM2: number, partOf: (app: ApplicationInput) => Area3 | undefined): RowFigures {
	const f = empty(areaM2);
	const products = new Map<string, ProductFigures>();
	for (const app of apps) {
		const part = partOf(app);
		if (!part) continue;
		f.applications++;
		f.coveredM2 += part.coveredM2;
		f.sprayedM2 += part.sprayedM2;
		f.volumeL += part.volumeL;
		addProducts(products, app, part);
	}
	return finish(f, products);
}

// A pixel on a shared edge can fall to both sides or neither: the rest may come out a few square
// centimetres below zero where zones cover everything. Such crumbs read as zero.
const crumb = (value: number, whole: number) => (value < 0 && value > -1e-6 * Math.abs(whole) - 1e-3 ? 0 : value);

/** The rest of the field: the field's figures less the zones'. */
function restOf(field: RowFigures, zones: RowFigures[]): RowFigures {
	const minus = (pick: (f: RowFigures) => number) => crumb(pick(field) - zones.reduce((s, z) => s + pick(z), 0), pick(field));
	const products = new Map<string, ProductFigures>();
	for (const p of field.products) {
		const inZones = zones.map((z) => z.products.find((q) => q.productId === p.productId));
		const sub = (pick: (q: ProductFigures) => number | null) => {
			const whole = pick(p);
			if (whole === null) return null;
			let rest = whole;
			for (const q of inZones) {
				const v = q ? pick(q) : 0;
				if (v === null) return null;
				rest -= v;
			}
			return crumb(rest, whole);
		};
		products.set(p.productId, {
			...p,
			appliedUnits: sub((q) => q.appliedUnits)!,
			broadcastUnits: sub((q) => q.broadcastUnits)!,
			savedUnits: sub((q) => q.savedUnits)!,
			appliedCost: sub((q) => q.appliedCost),
			broadcastCost: sub((q) => q.broadcastCost),
			savedCost: sub((q) => q.savedCost)
		});
	}
	return finish(
		{
			applications: field.applications,
			areaM2: minus((f) => f.areaM2),
			coveredM2: minus((f) => f.coveredM2),
			sprayedM2: minus((f) => f.sprayedM2),
			volumeL: minus((f) => f.volumeL),
			sharePercent: null,
			products: []
		},
		products
	);
}

function seasonRows(apps: ApplicationInput[], fieldAreaM2: number, zones: ZoneInput[], zoneParts: Map<string, Map<string, Area3>>) {
	const field = sumOver(apps, fieldAreaM2, (a) => a);
	const zoneRows = zones.map((z) => sumOver(apps, z.areaM2, (a) => zoneParts.get(z.id)?.get(a.id) ?? missing(z, a)));
	return { field, zones: zoneRows, rest: restOf(field, zoneRows) };
}

function missing(z: ZoneInput, a: ApplicationInput): never {
	throw new Error(`zone summary: no figures for zone ${z.id} from application ${a.id}`);
}

/**
 * The zone table of a field for one season: a row per zone, the rest of the field and the whole
 * field, each with the previous season's figures and the change in treated share.
 * `zoneParts` holds every zone's figures from every application given (zone id -> application id).
 */
export function summariseZones({
	season,
	fieldAreaM2,
	zones,
	applications,
	zoneParts
}: {
	season: number;
	fieldAreaM2: number;
	zones: ZoneInput[];
	applications: ApplicationInput[];
	zoneParts: Map<string, Map<string, Area3>>;
}): ZoneSummary {
	const previousSeason = applications.map((a) => a.season).filter((s) => s < season).reduce<number | null>((m, s) => (m === null || s > m ? s : m), null);
	const now = seasonRows(applications.filter((a) => a.season === season), fieldAreaM2, zones, zoneParts);
	const then = previousSeason === null ? null : seasonRows(applications.filter((a) => a.season === previousSeason), fieldAreaM2, zones, zoneParts);
	const row = (kind: SummaryRow['kind'], id: string, name: string, target: number | null, f: RowFigures, prev: RowFigures | null): SummaryRow => ({
		kind,
		id,
		name,
		targetRateLPerM2: target,
		...f,
		previous: prev,
		changePp: f.sharePercent !== null && prev?.sharePercent != null ? f.sharePercent - prev.sharePercent : null
	});
	const products = new Map<string, { id: string; name: string; unit: 'L' | 'kg' }>();
	for (const a of applications) if (a.season === season) for (const p of a.products) if (!products.has(p.id)) products.set(p.id, { id: p.id, name: p.name, unit: p.unit });
	return {
		season,
		previousSeason,
		products: [...products.values()],
		rows: [
			...zones.map((z, i) => row('zone', z.id, z.name, z.targetRateLPerM2, now.zones[i], then?.zones[i] ?? null)),
			row('rest', 'rest', 'Rest of the field', null, now.rest, then?.rest ?? null),
			row('field', 'field', 'Whole field', null, now.field, then?.field ?? null)
		]
	};
}
