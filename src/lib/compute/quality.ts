// Application quality from an as-applied log: how much of the distance sprayed was driven too
// fast, with the boom too high or too low, or at a pressure outside the working range, and where
// the log has gaps. Sensors miss weeds when the boom is too high or the sprayer too fast
// (DOMAIN.md §2, [R5][R59]); the limits come from the machine's profile in the catalogue.
import { simplify } from '@turf/turf';
import { distanceM } from './clean-fixes';
import { DRAW_LIMITS } from './coverage';
import type { FixColumns } from './types';

/** The machine's limits; null = not checked. */
export type QualityLimits = {
	maxSpeedMPerS: number | null;
	targetHeightM: number | null;
	heightToleranceM: number | null;
	pressureMinPa: number | null;
	pressureMaxPa: number | null;
};

/** Bits of a flagged stretch of track. */
export const FLAG = { speed: 1, height: 2, pressure: 4, gap: 8 } as const;
export type FlagKind = keyof typeof FLAG;

/**
 * One check's figures. `not-logged`: the log has no such column (or no value in it);
 * `no-limit`: the machine sets no limit for it.
 */
export type CheckFigures =
	| {
			status: 'checked';
			/** Distance sprayed where the value was known, m. */
			checkedM: number;
			/** Of that, outside the limit, m. */
			flaggedM: number;
			/** flaggedM / checkedM x 100; null when nothing was checked. */
			sharePercent: number | null;
			/** Lowest and highest value seen while spraying, SI. */
			min: number | null;
			max: number | null;
	  }
	| { status: 'not-logged' }
	| { status: 'no-limit'; min: number | null; max: number | null };

export type QualitySummary = {
	v: 1;
	/** Distance of intervals drawn with the master on (every drawn interval when the log has no master), m. */
	sprayingDistanceM: number;
	/** The limits the figures were computed with. */
	limits: QualityLimits;
	/** Speed from the log's column where it has a value, else from positions and times. */
	speed: CheckFigures & { source: 'logged' | 'positions' };
	height: CheckFigures;
	pressure: CheckFigures;
	/** Intervals over 3 s (or implausibly fast) while spraying, as coverage skips them. */
	gaps: { count: number; seconds: number; distanceM: number };
};

/** A flagged stretch of track: its flags (FLAG bits) and its line, [lng, lat]. */
export type FlaggedRun = { f: number; c: [number, number][] };

export type QualityOptions = {
	/** Simplification tolerance for the stored track, degrees (3e-6 is about 0.3 m). */
	toleranceDeg?: number;
	/** Above this many points in all runs, simplify ten times coarser (keeps a record's map small). */
	maxPoints?: number;
};

const round7 = (v: number) => Math.round(v * 1e7) / 1e7;

class Check {
	checkedM = 0;
	flaggedM = 0;
	min = Infinity;
	max = -Infinity;
	seen = false;
	see(value: number) {
		this.seen = true;
		if (value < this.min) this.min = value;
		if (value > this.max) this.max = value;
	}
	figures(hasLimit: boolean, hasColumn: boolean): CheckFigures {
		if (!hasColumn || !this.seen) return { status: 'not-logged' };
		const min = Number.isFinite(this.min) ? this.min : null;
		const max = Number.isFinite(this.max) ? this.max : null;
		if (!hasLimit) return { status: 'no-limit', min, max };
		return {
			status: 'checked',
			checkedM: this.checkedM,
			flaggedM: this.flaggedM,
			sharePercent: this.checkedM > 0 ? (100 * this.flaggedM) / this.checkedM : null,
			min,
			max
		};
	}
}

/**
 * Quality figures and flagged track of one application's fixes (cleaned, time-ordered; with
 * `isStart`, only the intervals that start at a flagged fix belong to them, as in coverage).
 * @example const { summary, runs } = assessQuality(fixes, { maxSpeedMPerS: 20 / 3.6, targetHeightM: 0.5, heightToleranceM: 0.1, pressureMinPa: 2e5, pressureMaxPa: 4e5 });
 */
export function assessQuality(
	fixes: FixColumns,
	limits: QualityLimits,
	{ toleranceDeg = 3e-6, maxPoints = 20_000 }: QualityOptions = {}
): { summary: QualitySummary; runs: FlaggedRun[] } {
	const { count: n, timeS, lng, lat, master, isStart, speedMPerS: loggedSpeed, boomHeightM: height, pressurePa: pressure } = fixes;
	const hasSpeedLimit = limits.maxSpeedMPerS !== null && limits.maxSpeedMPerS > 0;
	const hasHeightLimit = limits.targetHeightM !== null && limits.heightToleranceM !== null;
	const hasPressureLimit = limits.pressureMinPa !== null || limits.pressureMaxPa !== null;
	const heightLow = hasHeightLimit ? limits.targetHeightM! - limits.heightToleranceM! : -Infinity;
	const heightHigh = hasHeightLimit ? limits.targetHeightM! + limits.heightToleranceM! : Infinity;
	const pressureLow = limits.pressureMinPa ?? -Infinity;
	const pressureHigh = limits.pressureMaxPa ?? Infinity;

	const speed = new Check();
	const heights = new Check();
	const pressures = new Check();
	let sprayingDistanceM = 0;
	let loggedSpeeds = 0;
	let positionSpeeds = 0;
	const gaps = { count: 0, seconds: 0, distanceM: 0 };
	const runs: FlaggedRun[] = [];
	let open: FlaggedRun | null = null;
	let openEnd = -1;

	const flag = (i: number, flags: number) => {
		if (open && open.f === flags && openEnd === i) {
			open.c.push([lng[i + 1], lat[i + 1]]);
		} else {
			open = { f: flags, c: [[lng[i], lat[i]], [lng[i + 1], lat[i + 1]]] };
			runs.push(open);
		}
		openEnd = i + 1;
	};

	for (let i = 0; i + 1 < n; i++) {
		if (isStart && !isStart[i]) continue;
		const spraying = !master || master[i] !== 0 || master[i + 1] !== 0;
		const dt = timeS[i + 1] - timeS[i];
		const dist = distanceM(lng[i], lat[i], lng[i + 1], lat[i + 1]);
		if (!(dt > 0)) continue; // cleaned logs have none; nothing to judge
		if (dt > DRAW_LIMITS.maxGapS || dist > DRAW_LIMITS.maxSpeedMPerS * dt) {
			// A gap matters only where the boom may have sprayed unseen.
			if (spraying) {
				gaps.count++;
				gaps.seconds += dt;
				gaps.distanceM += dist;
				flag(i, FLAG.gap);
			}
			continue;
		}
		if (master && master[i] === 0) continue; // not spraying: speed and height do not matter
		sprayingDistanceM += dist;
		let flags = 0;

		const logged = loggedSpeed ? loggedSpeed[i] : NaN;
		let v: number;
		if (Number.isFinite(logged)) {
			v = logged;
			loggedSpeeds++;
		} else {
			v = dist / dt;
			positionSpeeds++;
		}
		speed.see(v);
		if (hasSpeedLimit) {
			speed.checkedM += dist;
			if (v > limits.maxSpeedMPerS!) {
				speed.flaggedM += dist;
				flags |= FLAG.speed;
			}
		}

		const h = height ? height[i] : NaN;
		if (Number.isFinite(h)) {
			heights.see(h);
			if (hasHeightLimit) {
				heights.checkedM += dist;
				if (h < heightLow || h > heightHigh) {
					heights.flaggedM += dist;
					flags |= FLAG.height;
				}
			}
		}

		const p = pressure ? pressure[i] : NaN;
		if (Number.isFinite(p)) {
			pressures.see(p);
			if (hasPressureLimit) {
				pressures.checkedM += dist;
				if (p < pressureLow || p > pressureHigh) {
					pressures.flaggedM += dist;
					flags |= FLAG.pressure;
				}
			}
		}
		if (flags) flag(i, flags);
	}

	const summary: QualitySummary = {
		v: 1,
		sprayingDistanceM,
		// Only the limits: callers may pass a whole machine row.
		limits: {
			maxSpeedMPerS: limits.maxSpeedMPerS,
			targetHeightM: limits.targetHeightM,
			heightToleranceM: limits.heightToleranceM,
			pressureMinPa: limits.pressureMinPa,
			pressureMaxPa: limits.pressureMaxPa
		},
		speed: { ...speed.figures(hasSpeedLimit, true), source: loggedSpeeds >= positionSpeeds && loggedSpeeds > 0 ? 'logged' : 'positions' },
		height: heights.figures(hasHeightLimit, !!height),
		pressure: pressures.figures(hasPressureLimit, !!pressure),
		gaps
	};
	// With no interval spraying, speed was never seen: say so rather than "no limit".
	if (!speed.seen && summary.speed.status !== 'not-logged') summary.speed = { status: 'not-logged', source: 'positions' };
	return { summary, runs: simplifyRuns(runs, toleranceDeg, maxPoints) };
}

function simplifyRuns(runs: FlaggedRun[], toleranceDeg: number, maxPoints: number): FlaggedRun[] {
	const once = (tolerance: number) =>
		runs.map((r) => {
			const line = r.c.length > 2 ? simplify({ type: 'LineString', coordinates: r.c }, { tolerance, highQuality: false, mutate: false }).coordinates : r.c;
			return { f: r.f, c: line.map(([x, y]) => [round7(x), round7(y)] as [number, number]) };
		});
	let out = once(toleranceDeg);
	if (out.reduce((n, r) => n + r.c.length, 0) > maxPoints) out = once(toleranceDeg * 10);
	return out;
}

/** The flags of a run as words, in a fixed order. */
export function flagKinds(flags: number): FlagKind[] {
	return (Object.keys(FLAG) as FlagKind[]).filter((k) => flags & FLAG[k]);
}
