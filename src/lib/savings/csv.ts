// The savings report as CSV (RFC 4180, through the exports' writer in $lib/export/csv: CRLF line
// ends, quotes doubled, formulas escaped). Numbers are plain (no grouping) in the user's units,
// and every header names its unit, so a liquid and a dry product get their own columns.
import { toCsv } from '$lib/export/csv';
import { fromSi } from '$lib/compute/units';
import type { SavingsRow } from '$lib/compute/savings-table';
import { unitsFor, type UnitSystem } from '$lib/format';

const round = (v: number | null | undefined, decimals: number) =>
	v === null || v === undefined || !Number.isFinite(v) ? '' : Number(v.toFixed(decimals));

/** A product amount (L or kg) in the user's unit for it. */
export function amountIn(units: number, unit: 'L' | 'kg', system: UnitSystem): number {
	return unit === 'L' ? fromSi('volume', units, unitsFor[system].volume) : fromSi('mass', units, unitsFor[system].mass);
}

/** A price per L or kg as a price per gal or lb (or unchanged in metric). */
export function pricePerShownUnit(pricePerUnit: number, unit: 'L' | 'kg', system: UnitSystem): number {
	// Money per L times the L in one shown unit: divide the amount conversion.
	return pricePerUnit / amountIn(1, unit, system);
}

/** Money per m2 as money per ha or ac. */
export function perShownArea(costPerM2: number, system: UnitSystem): number {
	return costPerM2 / fromSi('area', 1, unitsFor[system].area);
}

export function savingsCsv(rows: SavingsRow[], system: UnitSystem, currency: string): string {
	const u = unitsFor[system];
	const liquid = u.volume, dry = u.mass, area = u.area;
	const header = [
		'Season',
		'Field',
		'Product',
		'Applications',
		`Covered area (${area})`,
		`Broadcast equivalent (${liquid})`,
		`Broadcast equivalent (${dry})`,
		`Applied (${liquid})`,
		`Applied (${dry})`,
		`Saved (${liquid})`,
		`Saved (${dry})`,
		'Saved (%)',
		`Price (${currency}/${liquid})`,
		`Price (${currency}/${dry})`,
		`Broadcast cost (${currency})`,
		`Applied cost (${currency})`,
		`Saved (${currency})`,
		`Applied cost (${currency}/${area})`,
		`Saved (${currency}/${area})`
	];
	const body = rows.map((r) => {
		const isLiquid = r.unit === 'L';
		const amount = (v: number) => round(amountIn(v, r.unit, system), 3);
		const pair = (v: number | string) => (isLiquid ? [v, ''] : ['', v]);
		return [
			r.season,
			r.fieldName,
			r.productName,
			r.applications,
			round(fromSi('area', r.coveredM2, area), 4),
			...pair(amount(r.broadcastUnits)),
			...pair(amount(r.appliedUnits)),
			...pair(amount(r.savedUnits)),
			round(r.percentSaved, 1),
			...pair(r.pricePerUnit === null ? '' : round(pricePerShownUnit(r.pricePerUnit, r.unit, system), 4)),
			round(r.broadcastCost, 2),
			round(r.appliedCost, 2),
			round(r.savedCost, 2),
			round(r.appliedCostPerM2 === null ? null : perShownArea(r.appliedCostPerM2, system), 4),
			round(r.savedCostPerM2 === null ? null : perShownArea(r.savedCostPerM2, system), 4)
		];
	});
	return toCsv(header, body);
}
