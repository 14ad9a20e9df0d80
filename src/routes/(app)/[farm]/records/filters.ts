// The records list's filters from the URL, shared by the list, its CSV and its print view, so all
// three always show the same records.
import type { RecordFilters } from '$lib/server/records';

const uuid = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export type FilterState = RecordFilters & { seasonParam: string };

/** No season in the URL means the newest season; "all" means every season. */
export function filtersFrom(params: URLSearchParams, seasons: number[]): FilterState {
	const seasonParam = params.get('season') ?? '';
	const season = seasonParam === 'all' ? null : /^\d{4}$/.test(seasonParam) ? Number(seasonParam) : (seasons[0] ?? null);
	const id = (key: string) => {
		const v = params.get(key) ?? '';
		return uuid.test(v) ? v : null;
	};
	const status = params.get('status');
	return {
		seasonParam: season === null ? 'all' : String(season),
		season,
		fieldId: id('field'),
		productId: id('product'),
		applicator: params.get('applicator')?.trim().slice(0, 200) || null,
		status: status === 'todo' || status === 'signed' ? status : null
	};
}

/** The same filters as a query string, for links to the CSV and print views. */
export function filterQuery(f: FilterState): string {
	const q = new URLSearchParams({ season: f.seasonParam });
	if (f.fieldId) q.set('field', f.fieldId);
	if (f.productId) q.set('product', f.productId);
	if (f.applicator) q.set('applicator', f.applicator);
	if (f.status) q.set('status', f.status);
	return q.toString();
}
