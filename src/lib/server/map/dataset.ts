// What a map request asks for: one season, one application, or two seasons compared; and an
// optional threshold to preview before it is saved. Parsed from the query string of the map API
// and the tile route alike, so both name the same data the same way.

export type Dataset =
	| { kind: 'season'; season: number }
	| { kind: 'application'; applicationId: string }
	| { kind: 'compare'; earlier: number; later: number };

export type MapQuery = { dataset: Dataset; thresholdPercent: number | null };

export const THRESHOLD_MIN_PERCENT = 0.5;
export const THRESHOLD_MAX_PERCENT = 100;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const SEASON = /^\d{4}$/;

/** The query's dataset and threshold, or a sentence saying which parameter is wrong. */
export function parseMapQuery(params: URLSearchParams): MapQuery | { error: string } {
	const season = params.get('season');
	const application = params.get('application');
	const compare = params.get('compare');
	const given = [season, application, compare].filter((v) => v !== null).length;
	if (given !== 1) return { error: 'Give exactly one of season=YYYY, application=<id> or compare=YYYY,YYYY.' };

	let thresholdPercent: number | null = null;
	const t = params.get('threshold');
	if (t !== null) {
		const value = Number(t);
		if (t.trim() === '' || !Number.isFinite(value) || value < THRESHOLD_MIN_PERCENT || value > THRESHOLD_MAX_PERCENT) {
			return { error: `threshold must be a number from ${THRESHOLD_MIN_PERCENT} to ${THRESHOLD_MAX_PERCENT} (percent), got “${t}”.` };
		}
		thresholdPercent = value;
	}

	if (season !== null) {
		if (!SEASON.test(season)) return { error: `season must be a four-digit year, got “${season}”.` };
		return { dataset: { kind: 'season', season: Number(season) }, thresholdPercent };
	}
	if (application !== null) {
		if (!UUID.test(application)) return { error: `application must be an application id, got “${application}”.` };
		return { dataset: { kind: 'application', applicationId: application.toLowerCase() }, thresholdPercent };
	}
	const parts = compare!.split(',');
	if (parts.length !== 2 || !parts.every((p) => SEASON.test(p))) {
		return { error: `compare must be two four-digit years, earlier first, e.g. compare=2024,2025; got “${compare}”.` };
	}
	const [earlier, later] = parts.map(Number);
	if (earlier >= later) return { error: `compare needs the earlier season first and two different seasons, got “${compare}”.` };
	return { dataset: { kind: 'compare', earlier, later }, thresholdPercent };
}

/** A stable text form of the dataset, for cache keys. */
export function datasetKey(d: Dataset): string {
	if (d.kind === 'season') return `s${d.season}`;
	if (d.kind === 'application') return `a${d.applicationId}`;
	return `c${d.earlier}-${d.later}`;
}
