// One log spec -> the fixes the sprayer would have logged. Seeded by the log's file name, so any
// one log can be made alone.
import { tankMix } from './catalogue';
import { drive, type FixTable } from './drive';
import type { Xy } from './frame';
import { fieldNamed } from './layout';
import { between, randomFor } from './random';
import { gateOf, Path, routeField, transit } from './route';
import { YARD, type LogSpec } from './schedule';
import { weedRaster } from './weeds';

/** April to June, the only months the demo sprays, are Pacific daylight time: UTC-7. */
const PDT_OFFSET_MIN = -7 * 60;

export function startMsOf(spec: LogSpec): number {
	const [y, m, d] = spec.day.split('-').map(Number);
	return Date.UTC(y, m - 1, d) + (spec.startMin - PDT_OFFSET_MIN) * 60_000;
}

/** Copies src's segments onto dst until maxLengthM of path has been added. */
function appendUpTo(dst: Path, src: Path, maxLengthM: number): void {
	let left = maxLengthM;
	for (let k = 0; k + 1 < src.xs.length && left > 0; k++) {
		const len = Math.hypot(src.xs[k + 1] - src.xs[k], src.ys[k + 1] - src.ys[k]);
		const f = Math.min(1, left / len);
		const p: Xy = [src.xs[k] + (src.xs[k + 1] - src.xs[k]) * f, src.ys[k] + (src.ys[k + 1] - src.ys[k]) * f];
		dst.to(p, src.master[k] === 1, src.cruise[k], f < 1 ? 3 : src.cap[k + 1]);
		left -= len;
	}
}

export function planPath(spec: LogSpec, rand: () => number): Path {
	const path = new Path();
	const first = fieldNamed(spec.jobs[0].field);
	path.start(spec.from ?? gateOf(first, YARD));
	for (const job of spec.jobs) {
		const field = fieldNamed(job.field);
		const opts = { rand, boomWidthM: spec.machine.boomWidthM, headlands: job.headlands };
		if (job.maxLengthM === undefined) routeField(path, field, opts);
		else {
			const part = new Path();
			part.start(path.last);
			routeField(part, field, opts);
			appendUpTo(path, part, job.maxLengthM);
		}
	}
	// Out of the last field onto the road.
	transit(path, gateOf(fieldNamed(spec.jobs[spec.jobs.length - 1].field), path.last));
	return path;
}

export function simulateLog(spec: LogSpec): FixTable {
	const rand = randomFor(`log/${spec.file}`);
	const path = planPath(spec, rand);
	const rasters = spec.jobs.map((j) => weedRaster(fieldNamed(j.field), spec.season, spec.pass));
	return drive(path, {
		startMs: startMsOf(spec),
		boom: spec.machine,
		carrierLPerHa: tankMix(spec.tankMix).carrierLPerHa,
		rasters,
		rand,
		lunchAfterS: between(rand, 3.2, 3.8) * 3600,
		lunchS: Math.round(between(rand, 30, 50)) * 60,
		gapChance: 1 / 3000
	});
}
