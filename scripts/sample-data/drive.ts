// Drives a planned path at 5 Hz the way a spot sprayer logs it: speed eased into corners and
// U-turns, a little GNSS noise, a few seconds of missing fixes now and then, and each sensor
// opening its nozzles where a weed lies in its band, from a short lead before to a short lag after.
import type { Path } from './route';
import { WEED_PIXEL_M, type WeedRaster } from './weeds';
import { gaussian } from './random';

export const FIX_INTERVAL_MS = 200;
const DT_S = FIX_INTERVAL_MS / 1000;
const ACCEL_MPS2 = 0.8;
const DECEL_MPS2 = 1.2;
const LOOKAHEAD_M = 45;
/** Sensor timing as distance: open this far before the weed, stay open this far after. */
export const LEAD_M = 0.3;
export const LAG_M = 0.3;

export type Boom = { boomWidthM: number; nozzleCount: number; nozzleSpacingM: number; nozzlesPerSensor: number };

/** The log as columns, in local metres; writers turn it into files. */
export type FixTable = {
	count: number;
	nozzleCount: number;
	nozzlesPerSensor: number;
	timeMs: Float64Array;
	e: Float64Array;
	n: Float64Array;
	speedKmh: Float32Array;
	headingDeg: Float32Array;
	master: Uint8Array;
	rateLPerHa: Float32Array;
	/** Per fix, one byte per sensor: 1 open. */
	sensors: Uint8Array;
};

export type DriveOptions = {
	startMs: number;
	boom: Boom;
	carrierLPerHa: number;
	rasters: WeedRaster[];
	rand: () => number;
	/** Stop once this much path time has been driven (short sample logs). */
	maxSeconds?: number;
	/** A lunch stop (no fixes) after this much driving, at the next turn. */
	lunchAfterS?: number;
	lunchS?: number;
	/** Chance per fix that a short run of fixes goes missing. */
	gapChance?: number;
};

class Grow {
	private cap = 4096;
	count = 0;
	timeMs = new Float64Array(this.cap);
	e = new Float64Array(this.cap);
	n = new Float64Array(this.cap);
	speed = new Float32Array(this.cap);
	heading = new Float32Array(this.cap);
	master = new Uint8Array(this.cap);
	rate = new Float32Array(this.cap);
	sensors: Uint8Array;
	constructor(private readonly nSensors: number) {
		this.sensors = new Uint8Array(this.cap * nSensors);
	}
	ensure(): void {
		if (this.count < this.cap) return;
		this.cap *= 2;
		const grow = <T extends Float64Array | Float32Array | Uint8Array>(a: T, k = 1): T => {
			const b = new (a.constructor as new (n: number) => T)(this.cap * k);
			b.set(a);
			return b;
		};
		this.timeMs = grow(this.timeMs);
		this.e = grow(this.e);
		this.n = grow(this.n);
		this.speed = grow(this.speed);
		this.heading = grow(this.heading);
		this.master = grow(this.master);
		this.rate = grow(this.rate);
		this.sensors = grow(this.sensors, this.nSensors);
	}
}

function rasterAt(rasters: WeedRaster[], e: number, n: number): WeedRaster | null {
	for (const r of rasters)
		if (e >= r.minE && n >= r.minN && e < r.minE + r.cols * WEED_PIXEL_M && n < r.minN + r.rows * WEED_PIXEL_M) return r;
	return null;
}

export function drive(path: Path, opts: DriveOptions): FixTable {
	const { boom, rand } = opts;
	const nSensors = Math.ceil(boom.nozzleCount / boom.nozzlesPerSensor);
	const bandM = boom.nozzlesPerSensor * boom.nozzleSpacingM;
	// Sensor band centres across the boom, negative = left of travel; two samples across each band.
	const lateral: number[] = [];
	for (let s = 0; s < nSensors; s++) {
		const centre = (s + 0.5) * bandM - boom.boomWidthM / 2;
		lateral.push(centre - bandM / 4, centre + bandM / 4);
	}
	const out = new Grow(nSensors);
	const { xs, ys, master, cruise, cap } = path;
	const segLen = xs.slice(1).map((x, k) => Math.hypot(x - xs[k], ys[k + 1] - ys[k]));
	let seg = 0;
	let u = 0;
	let v = 1;
	let tick = 0;
	let extraMs = 0;
	let gapLeft = 0;
	let lunchTaken = opts.lunchAfterS === undefined;
	// GNSS error: about 2 cm, nearly all of it a slowly wandering bias (receiver errors are strongly
	// correlated from one 0.2 s fix to the next), plus 1 mm of white noise. Uncorrelated
	// centimetres would swing the heading by a degree from fix to fix, which a 36 m boom turns
	// into wedge-shaped holes in the covered area that a real machine does not leave.
	let biasE = 0;
	let biasN = 0;
	const maxTicks = opts.maxSeconds ? Math.round(opts.maxSeconds / DT_S) : Infinity;
	while (seg < segLen.length && tick < maxTicks) {
		const len = segLen[seg];
		const dx = (xs[seg + 1] - xs[seg]) / len;
		const dy = (ys[seg + 1] - ys[seg]) / len;
		const x = xs[seg] + dx * u;
		const y = ys[seg] + dy * u;
		const on = master[seg] === 1;

		if (!lunchTaken && tick * DT_S > opts.lunchAfterS! && !on) {
			extraMs += Math.round(opts.lunchS ?? 2400) * 1000;
			lunchTaken = true;
		}
		biasE = 0.998 * biasE + 0.0012 * gaussian(rand);
		biasN = 0.998 * biasN + 0.0012 * gaussian(rand);
		if (gapLeft === 0 && opts.gapChance && rand() < opts.gapChance) gapLeft = 10 + Math.floor(rand() * 25);
		if (gapLeft > 0) gapLeft--;
		else {
			out.ensure();
			const i = out.count++;
			out.timeMs[i] = opts.startMs + extraMs + tick * FIX_INTERVAL_MS;
			out.e[i] = x + biasE + 0.001 * gaussian(rand);
			out.n[i] = y + biasN + 0.001 * gaussian(rand);
			out.speed[i] = Math.max(0, v * 3.6 + 0.05 * gaussian(rand));
			out.heading[i] = ((Math.atan2(dx, dy) * 180) / Math.PI + 360) % 360;
			out.master[i] = on ? 1 : 0;
			out.rate[i] = on ? opts.carrierLPerHa * (1 + 0.015 * gaussian(rand)) : 0;
			if (on) {
				const r = rasterAt(opts.rasters, x, y);
				if (r) {
					// The interval this fix starts, widened by the lead and the lag.
					const stepM = v * DT_S;
					const base = i * nSensors;
					const rx = dy;
					const ry = -dx;
					const inv = 1 / WEED_PIXEL_M;
					for (let t = -LAG_M; t <= stepM + LEAD_M; t += 0.4) {
						const px = x + dx * t - r.minE;
						const py = y + dy * t - r.minN;
						for (let k = 0; k < lateral.length; k++) {
							const col = Math.floor((px + lateral[k] * rx) * inv);
							const row = Math.floor((py + lateral[k] * ry) * inv);
							if (col >= 0 && row >= 0 && col < r.cols && row < r.rows && r.data[row * r.cols + col]) out.sensors[base + (k >> 1)] = 1;
						}
					}
				}
			}
		}

		// Speed: the operator's aim, eased down ahead of slow corners and turns.
		let target = cruise[seg];
		let ahead = len - u;
		for (let j = seg + 1; j < xs.length && ahead < LOOKAHEAD_M; j++) {
			target = Math.min(target, Math.sqrt(cap[j] ** 2 + 2 * DECEL_MPS2 * ahead));
			if (j < segLen.length) ahead += segLen[j];
		}
		target += 0.05 * gaussian(rand);
		v += Math.max(-DECEL_MPS2 * DT_S, Math.min(ACCEL_MPS2 * DT_S, target - v));
		v = Math.max(0.3, v);
		u += v * DT_S;
		while (seg < segLen.length && u >= segLen[seg]) {
			u -= segLen[seg];
			seg++;
		}
		tick++;
	}
	return {
		count: out.count,
		nozzleCount: boom.nozzleCount,
		nozzlesPerSensor: boom.nozzlesPerSensor,
		timeMs: out.timeMs.subarray(0, out.count),
		e: out.e.subarray(0, out.count),
		n: out.n.subarray(0, out.count),
		speedKmh: out.speed.subarray(0, out.count),
		headingDeg: out.heading.subarray(0, out.count),
		master: out.master.subarray(0, out.count),
		rateLPerHa: out.rate.subarray(0, out.count),
		sensors: out.sensors.subarray(0, out.count * nSensors)
	};
}
