// A season summary in words and numbers as people read them, in the viewer's units: the screen,
// the printed page and the PDF all show these same strings, so they cannot disagree.
import { formatAmount, formatArea, formatMoney, formatNumber, formatVolume, type UnitSystem } from '$lib/format';
import { leaseLabel } from '$lib/compute/landlord-share';
import { fromSi } from '$lib/compute/units';
import type { FieldSeasonSummary } from '$lib/server/summaries/season-summary';

export type SummaryFigure = { key: string; label: string; value: string; note?: string };
export type SummaryProductLine = { name: string; applied: string; broadcast: string; saved: string; cost: string | null };
export type SummaryLeaseLine = { name: string; lease: string; share: string };

const pct = (v: number | null) => (v === null ? '–' : `${formatNumber(v, 3, 1)} %`);

export function summaryFigures(s: FieldSeasonSummary, units: UnitSystem, currency: string): SummaryFigure[] {
	const out: SummaryFigure[] = [
		{ key: 'area', label: 'Field area', value: formatArea(s.field.areaM2, units) },
		{ key: 'applications', label: 'Applications', value: String(s.applications.length) },
		{
			key: 'of-field',
			label: 'Field sprayed',
			value: pct(s.percentOfField),
			note: s.applications.length > 1 ? `of the field per pass, over ${s.applications.length} passes` : 'of the field'
		},
		{ key: 'sprayed-share', label: 'Sprayed share', value: pct(s.sprayedPercent), note: 'of the area driven over' },
		{ key: 'liquid', label: 'Spray liquid used', value: formatVolume(s.volumeL, units) },
		{ key: 'saved', label: 'Chemical saved (estimate)', value: pct(s.savedPercent), note: 'against a broadcast pass over the same area' }
	];
	if (s.herbicideCost !== null) {
		out.push({ key: 'cost', label: 'Herbicide cost', value: formatMoney(s.herbicideCost, currency), note: 'product applied at catalogue prices' });
	}
	if (s.savedCost !== null) out.push({ key: 'saved-cost', label: 'Saved against broadcast (estimate)', value: formatMoney(s.savedCost, currency) });
	return out;
}

export function summaryProducts(s: FieldSeasonSummary, units: UnitSystem, currency: string): SummaryProductLine[] {
	return s.products.map((p) => ({
		name: p.productName,
		applied: formatAmount(p.appliedUnits, p.unit, units),
		broadcast: formatAmount(p.broadcastUnits, p.unit, units),
		saved: `${formatAmount(p.savedUnits, p.unit, units)}${p.percentSaved === null ? '' : ` (${formatNumber(p.percentSaved, 3, 0)} %)`}`,
		cost: s.herbicideCost === null ? null : formatMoney(p.appliedCost, currency)
	}));
}

export function summaryLeases(s: FieldSeasonSummary, currency: string): SummaryLeaseLine[] {
	return s.leases.map((l) => ({
		name: l.name,
		lease: leaseLabel(l.lease),
		share:
			l.lease.kind === 'cash-rent'
				? 'No share under cash rent'
				: l.share === null
					? 'Share not known: no product has a catalogue price'
					: `${formatMoney(l.share, currency)} (${leaseLabel(l.lease).replace(' crop share', '')} of ${formatMoney(s.herbicideCost, currency)})`
	}));
}

/** The caution every summary carries, on screen, on paper and in the PDF. */
export const summaryCaution = [
	'Savings and costs are estimates from the logged data: a broadcast pass over the same covered area at the tank mix’s label rates, and product applied at today’s catalogue prices.',
	'They are not agronomic advice. The product label and local regulations govern every application; licensed applicators decide.'
];

/** The side of one map square in the reader's length unit: "10 m", "33 ft". */
export function blockSideLabel(sideM: number, units: UnitSystem): string {
	return units === 'us' ? `${formatNumber(fromSi('length', sideM, 'ft'), 3, 0)} ft` : `${formatNumber(sideM, 3, 1)} m`;
}
