// The zone table as CSV (RFC 4180, through the exports' writer src/lib/export/csv.ts) in the
// reader's unit system, each column's unit in its name (area_ha or area_ac, volume_l or
// volume_gal, ...), one set of product columns per product of the season's tank mixes, money only
// for those who may see prices.
import { toCsv, type CsvValue } from '../export/csv';
import { fromSi } from './units';
import type { ZoneSummary } from './zone-summary';

/** A number rounded to `decimals` for a CSV cell, without a "-0". */
export function fixed(value: number | null | undefined, decimals: number): number | null {
	if (value === null || value === undefined || !Number.isFinite(value)) return null;
	const r = Number(value.toFixed(decimals));
	return Object.is(r, -0) ? 0 : r;
}

export type CsvOptions = { units: 'metric' | 'us'; currency: string; seesMoney: boolean };

/** A product name as a column-name stem: lower case, letters and digits joined by underscores. */
export function columnStem(name: string): string {
	const stem = name
		.normalize('NFKD')
		.replace(/[\u0300-\u036f]/g, '')
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '_')
		.replace(/^_+|_+$/g, '');
	return stem || 'product';
}

export function zoneSummaryCsv(summary: ZoneSummary, { units, currency, seesMoney }: CsvOptions): string {
	const us = units === 'us';
	const area = us ? 'ac' : 'ha';
	const vol = us ? 'gal' : 'l';
	const rate = us ? 'gal_ac' : 'l_ha';
	const a = (m2: number) => fixed(fromSi('area', m2, us ? 'ac' : 'ha'), 4);
	const v = (l: number) => fixed(fromSi('volume', l, us ? 'gal' : 'L'), 3);
	const amount = (x: number, unit: 'L' | 'kg') => fixed(unit === 'L' ? fromSi('volume', x, us ? 'gal' : 'L') : fromSi('mass', x, us ? 'lb' : 'kg'), 3);
	const amountUnit = (unit: 'L' | 'kg') => (unit === 'L' ? vol : us ? 'lb' : 'kg');
	const money = (x: number | null) => fixed(x, 2);
	const cur = currency.toLowerCase();
	const prev = summary.previousSeason;

	const header = [
		'zone',
		'row_kind',
		'season',
		`area_${area}`,
		`covered_${area}`,
		`sprayed_${area}`,
		'treated_share_pct',
		`prev_treated_share_pct${prev ? `_${prev}` : ''}`,
		'change_share_pp',
		`volume_${vol}`,
		`target_rate_${rate}`
	];
	const stems = new Map<string, string>();
	for (const p of summary.products) {
		let stem = columnStem(p.name);
		while ([...stems.values()].includes(stem)) stem += '_2';
		stems.set(p.id, stem);
		const u = amountUnit(p.unit);
		header.push(`${stem}_applied_${u}`, `${stem}_broadcast_${u}`, `${stem}_saved_${u}`, `${stem}_saved_pct`);
		if (seesMoney) header.push(`${stem}_saved_${cur}`);
	}
	if (seesMoney) header.push(`saved_total_${cur}`);

	const rows: CsvValue[][] = summary.rows.map((r) => {
		const cells: CsvValue[] = [
			r.name,
			r.kind,
			summary.season,
			a(r.areaM2),
			a(r.coveredM2),
			a(r.sprayedM2),
			fixed(r.sharePercent, 2),
			fixed(r.previous?.sharePercent, 2),
			fixed(r.changePp, 2),
			v(r.volumeL),
			r.targetRateLPerM2 === null ? null : fixed(fromSi('volumePerArea', r.targetRateLPerM2, us ? 'gal/ac' : 'L/ha'), 3)
		];
		let total: number | null = 0;
		for (const p of summary.products) {
			const f = r.products.find((q) => q.productId === p.id);
			cells.push(f ? amount(f.appliedUnits, p.unit) : 0, f ? amount(f.broadcastUnits, p.unit) : 0, f ? amount(f.savedUnits, p.unit) : 0, fixed(f?.percentSaved, 2));
			if (seesMoney) cells.push(money(f ? f.savedCost : 0));
			total = total === null || (f && f.savedCost === null) ? null : total + (f?.savedCost ?? 0);
		}
		if (seesMoney) cells.push(money(total));
		return cells;
	});
	return toCsv(header, rows);
}
