// Application quality in words, the same on the record, its print and its CSV.
import type { CheckFigures, QualitySummary } from '$lib/compute/quality';
import { formatIn, formatNumber, unitsFor, type UnitSystem } from '$lib/format';

export type QualityLine = { key: 'speed' | 'height' | 'pressure' | 'gaps'; label: string; text: string; isFlagged: boolean };

const percent = (v: number | null) => (v === null ? '–' : `${formatNumber(v, 3, 1)} %`);

function share(c: CheckFigures): number | null {
	return c.status === 'checked' ? c.sharePercent : null;
}

/** One line per check, saying what was checked against what, or why it was not. */
export function qualityLines(q: QualitySummary, system: UnitSystem): QualityLine[] {
	const u = unitsFor[system];
	const distance = (m: number) => formatIn('length', m, system === 'us' ? 'mi' : 'km', 3);
	const speed = (v: number | null) => formatIn('speed', v, u.speed, 3);
	const height = (v: number | null) => formatIn('length', v, u.height, 3);
	const pressure = (v: number | null) => formatIn('pressure', v, u.pressure, 3);
	const lines: QualityLine[] = [];
	const sprayed = distance(q.sprayingDistanceM);

	const s = q.speed;
	const from = s.source === 'logged' ? 'the log’s speed column' : 'positions and times';
	lines.push({
		key: 'speed',
		label: 'Speed',
		isFlagged: (share(s) ?? 0) > 0,
		text:
			s.status === 'checked'
				? `${percent(s.sharePercent)} of ${sprayed} sprayed above ${speed(q.limits.maxSpeedMPerS)} (top ${speed(s.max)}, from ${from}).`
				: s.status === 'no-limit'
					? `No maximum speed set for the machine; ${speed(s.min)} to ${speed(s.max)} while spraying.`
					: 'No spraying with the master on to judge.'
	});

	const h = q.height;
	const band = `${height(q.limits.targetHeightM)} ± ${height(q.limits.heightToleranceM)}`;
	lines.push({
		key: 'height',
		label: 'Boom height',
		isFlagged: (share(h) ?? 0) > 0,
		text:
			h.status === 'checked'
				? `${percent(h.sharePercent)} of the distance outside ${band} (logged ${height(h.min)} to ${height(h.max)}).`
				: h.status === 'no-limit'
					? `No target height set for the machine; logged ${height(h.min)} to ${height(h.max)}.`
					: 'Not in the log.'
	});

	const p = q.pressure;
	const range =
		q.limits.pressureMinPa !== null && q.limits.pressureMaxPa !== null
			? `${pressure(q.limits.pressureMinPa)} to ${pressure(q.limits.pressureMaxPa)}`
			: q.limits.pressureMinPa !== null
				? `at least ${pressure(q.limits.pressureMinPa)}`
				: `at most ${pressure(q.limits.pressureMaxPa)}`;
	lines.push({
		key: 'pressure',
		label: 'Pressure',
		isFlagged: (share(p) ?? 0) > 0,
		text:
			p.status === 'checked'
				? `${percent(p.sharePercent)} of the distance outside ${range} (logged ${pressure(p.min)} to ${pressure(p.max)}).`
				: p.status === 'no-limit'
					? `No pressure range set for the machine; logged ${pressure(p.min)} to ${pressure(p.max)}.`
					: 'Not in the log.'
	});

	const g = q.gaps;
	lines.push({
		key: 'gaps',
		label: 'Gaps in the log',
		isFlagged: g.count > 0,
		text:
			g.count === 0
				? 'None while spraying.'
				: `${g.count} ${g.count === 1 ? 'gap' : 'gaps'} while spraying: ${formatNumber(g.seconds, 3, 0)} s and ${distance(g.distanceM)} with no fixes (not drawn on the map).`
	});
	return lines;
}

/** Shares for a table or CSV: null where not checked. */
export function qualityShares(q: QualitySummary | null) {
	return {
		speedPercent: q ? share(q.speed) : null,
		heightPercent: q ? share(q.height) : null,
		pressurePercent: q ? share(q.pressure) : null,
		gaps: q ? q.gaps.count : null
	};
}
