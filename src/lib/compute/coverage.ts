// Covered area, sprayed area and volume of one field (or zone) from a log's fixes, by the bit
// raster method of coverage-notes.md: every footprint is a rectangle (boom) or a set of
// rectangles (bands of open nozzles) whose pixel-centre ranges per pixel row come in closed
// form; OR-ing bits is the union, so overlaps count once without a polygon library. Volume
// counts overlaps and is accumulated per cell while the bands are drawn.
import type { BoomGeometry, CellFigures, FixColumns, GridSpec, SprayState } from './types';

/** Rings in projected metres as flat [x0, y0, x1, y1, ...] arrays, even-odd rule (holes, parts). */
export type Rings = Float64Array[];

export type CoverageInput = {
	/** Projected fix positions (metres in the grid's projection), indexed like `fixes`. */
	x: Float64Array;
	y: Float64Array;
	fixes: Pick<FixColumns, 'count' | 'timeS' | 'spray' | 'master' | 'rateLPerM2' | 'flowLPerS'>;
	/** Start fixes of the intervals to draw (interval i runs from fix i to fix i + 1); default all. */
	starts?: ArrayLike<number>;
	boom: BoomGeometry;
	/** Point scale factor of the projection at the field: projected length = ground length x k. */
	scaleFactor: number;
	grid: GridSpec;
};

export type CoverageOptions = {
	/** Square pixel side, m; must divide the cell size. */
	pixelM?: number;
	/** Carrier rate of the tank mix, L/m2, for logs with neither rate nor flow. */
	defaultRateLPerM2: number;
	maxGapS?: number;
	maxSpeedMPerS?: number;
	/** Memory for the two bit rasters; larger bounding boxes are processed in row strips. */
	maxRasterBytes?: number;
	/** Draw only the part of the region the fixes can reach (their extent plus half a boom):
	 * the same figures, less raster for a log that covers part of a field. */
	windowToFixes?: boolean;
};

export type CoverageTotals = {
	/** Exact ellipsoidal area of the region (shoelace / k^2). */
	areaM2: number;
	coveredM2: number;
	sprayedM2: number;
	/** Liquid applied inside the region (overlaps counted). */
	volumeL: number;
	/** Liquid of every drawn interval, also where the boom reached past the region. */
	volumeDrawnL: number;
	/** Intervals drawn (master on, within the gap and speed limits). */
	intervals: number;
	/** Intervals not drawn: longer than maxGapS, faster than maxSpeedMPerS, or time not increasing. */
	gaps: number;
	/** Intervals skipped because the master switch was off at their start. */
	masterOff: number;
};

export type CoverageResult = { totals: CoverageTotals; cells: CellFigures[] };

type Window = { col0: number; row0: number; cols: number; rows: number };

/** An interval longer than this, or faster, is not drawn: a gap in the log (DESIGN.md, footprints). */
export const DRAW_LIMITS = { maxGapS: 3, maxSpeedMPerS: 60 / 3.6 } as const;
const DEFAULTS = { pixelM: 0.1, ...DRAW_LIMITS, maxRasterBytes: 192 * 2 ** 20 };

/**
 * Coverage of a field: totals and per-cell figures for every grid cell that the region touches.
 * `region` is the field boundary projected into the grid's projection (holes respected).
 * @example computeCoverage({ x, y, fixes, boom, scaleFactor: k, grid }, rings, { defaultRateLPerM2: 0.01 })
 */
export function computeCoverage(
	input: CoverageInput,
	region: Rings,
	options: CoverageOptions
): CoverageResult {
	const g = input.grid;
	const whole = { col0: 0, row0: 0, cols: g.cols, rows: g.rows };
	return rasterise(input, region, options.windowToFixes ? fixesWindow(input, whole) : whole, options);
}

/** The cells of `whole` within reach of the fixes that start or end a drawn interval. */
function fixesWindow(input: CoverageInput, whole: Window): Window {
	const { x, y, grid: g } = input;
	const reach = (input.boom.boomWidthM / 2) * input.scaleFactor + g.cellSizeM;
	let minX = Infinity;
	let minY = Infinity;
	let maxX = -Infinity;
	let maxY = -Infinity;
	const take = (i: number) => {
		const px = x[i];
		const py = y[i];
		if (!Number.isFinite(px) || !Number.isFinite(py)) return;
		if (px < minX) minX = px;
		if (px > maxX) maxX = px;
		if (py < minY) minY = py;
		if (py > maxY) maxY = py;
	};
	if (input.starts) {
		for (let j = 0; j < input.starts.length; j++) {
			take(input.starts[j]);
			if (input.starts[j] + 1 < x.length) take(input.starts[j] + 1);
		}
	} else for (let i = 0; i < x.length; i++) take(i);
	if (!Number.isFinite(minX)) return { ...whole, cols: 1, rows: 1 };
	const col0 = Math.max(whole.col0, Math.floor((minX - reach - g.originX) / g.cellSizeM));
	const row0 = Math.max(whole.row0, Math.floor((minY - reach - g.originY) / g.cellSizeM));
	const col1 = Math.min(whole.col0 + whole.cols, Math.ceil((maxX + reach - g.originX) / g.cellSizeM));
	const row1 = Math.min(whole.row0 + whole.rows, Math.ceil((maxY + reach - g.originY) / g.cellSizeM));
	if (col1 <= col0 || row1 <= row0) return { ...whole, cols: 1, rows: 1 };
	return { col0, row0, cols: col1 - col0, rows: row1 - row0 };
}

/**
 * The same figures for an arbitrary polygon (a zone) in the field's grid: only footprints whose
 * bounding box meets the zone's are drawn, on a raster snapped to the field's cells and pixels.
 */
export function summariseZone(input: CoverageInput, zone: Rings, options: CoverageOptions): CoverageResult {
	const g = input.grid;
	const [minX, minY, maxX, maxY] = ringsBbox(zone);
	const col0 = Math.floor((minX - g.originX) / g.cellSizeM);
	const row0 = Math.floor((minY - g.originY) / g.cellSizeM);
	const col1 = Math.ceil((maxX - g.originX) / g.cellSizeM);
	const row1 = Math.ceil((maxY - g.originY) / g.cellSizeM);
	return rasterise(
		input,
		zone,
		{ col0, row0, cols: Math.max(1, col1 - col0), rows: Math.max(1, row1 - row0) },
		options
	);
}

function ringsBbox(rings: Rings): [number, number, number, number] {
	let minX = Infinity;
	let minY = Infinity;
	let maxX = -Infinity;
	let maxY = -Infinity;
	for (const r of rings) {
		for (let i = 0; i + 1 < r.length; i += 2) {
			if (r[i] < minX) minX = r[i];
			if (r[i] > maxX) maxX = r[i];
			if (r[i + 1] < minY) minY = r[i + 1];
			if (r[i + 1] > maxY) maxY = r[i + 1];
		}
	}
	if (!Number.isFinite(minX + minY + maxX + maxY)) throw new Error('region has no finite coordinates');
	return [minX, minY, maxX, maxY];
}

function ringsAreaM2(rings: Rings): number {
	// Even-odd: a ring inside an odd number of others is a hole.
	let total = 0;
	rings.forEach((r, idx) => {
		const n = r.length >> 1;
		let a = 0;
		for (let i = 0; i < n; i++) {
			const j = i + 1 === n ? 0 : i + 1;
			a += (r[2 * i] - r[0]) * (r[2 * j + 1] - r[1]) - (r[2 * j] - r[0]) * (r[2 * i + 1] - r[1]);
		}
		let depth = 0;
		rings.forEach((o, k) => {
			if (k !== idx && pointInRing(o, r[0], r[1])) depth++;
		});
		total += (depth % 2 ? -1 : 1) * Math.abs(a / 2);
	});
	return total;
}

function pointInRing(r: Float64Array, px: number, py: number): boolean {
	let inside = false;
	const n = r.length >> 1;
	for (let i = 0, k = n - 1; i < n; k = i++) {
		const yi = r[2 * i + 1];
		const yk = r[2 * k + 1];
		if (yi > py !== yk > py && px < ((r[2 * k] - r[2 * i]) * (py - yi)) / (yk - yi) + r[2 * i]) {
			inside = !inside;
		}
	}
	return inside;
}

function popcount(v: number): number {
	v = v - ((v >>> 1) & 0x55555555);
	v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
	return Math.imul((v + (v >>> 4)) & 0x0f0f0f0f, 0x01010101) >>> 24;
}

function countBits(a: Int32Array, base: number, c0: number, c1: number): number {
	const w0 = c0 >> 5;
	const w1 = c1 >> 5;
	const m0 = -1 << (c0 & 31);
	const m1 = -1 >>> (31 - (c1 & 31));
	if (w0 === w1) return popcount(a[base + w0] & m0 & m1);
	let s = popcount(a[base + w0] & m0) + popcount(a[base + w1] & m1);
	for (let w = w0 + 1; w < w1; w++) s += popcount(a[base + w]);
	return s;
}

// Ordered dither (16 x 16 Bayer) spreads a sprayed fraction evenly over a footprint: the
// pattern repeats every 16 pixels, so one 32-bit word per row and level holds it.
const DITHER_LEVELS = 256;
const ditherWords: Int32Array = (() => {
	const m = [[0]];
	let b = m;
	for (let n = 1; n < 16; n *= 2) {
		const next: number[][] = [];
		for (let y = 0; y < 2 * n; y++) {
			next.push([]);
			for (let x = 0; x < 2 * n; x++) {
				const q = [0, 2, 3, 1][(y >= n ? 2 : 0) + (x >= n ? 1 : 0)];
				next[y].push(4 * b[y % n][x % n] + q);
			}
		}
		b = next;
	}
	const out = new Int32Array(16 * (DITHER_LEVELS + 1));
	for (let y = 0; y < 16; y++) {
		for (let level = 0; level <= DITHER_LEVELS; level++) {
			let w = 0;
			for (let bit = 0; bit < 32; bit++) if (b[y][bit & 15] < level) w |= 1 << bit;
			out[y * (DITHER_LEVELS + 1) + level] = w;
		}
	}
	return out;
})();

function checkInput(input: CoverageInput, o: Required<CoverageOptions>) {
	const { fixes, boom, grid, x, y } = input;
	const n = fixes.count;
	if (x.length < n || y.length < n || fixes.timeS.length < n) {
		throw new Error(`coverage: ${n} fixes but ${x.length} x, ${y.length} y, ${fixes.timeS.length} times`);
	}
	if (!(input.scaleFactor > 0.9 && input.scaleFactor < 1.1)) {
		throw new Error(`coverage: scale factor ${input.scaleFactor} is not a UTM-like point scale`);
	}
	if (!(boom.boomWidthM > 0) || !(boom.nozzleSpacingM > 0) || !(boom.nozzleCount >= 1)) {
		throw new Error('coverage: the machine needs a positive boom width, nozzle spacing and nozzle count');
	}
	if (fixes.spray.kind === 'nozzles' && fixes.spray.nozzleCount !== boom.nozzleCount) {
		throw new Error(
			`coverage: the log has ${fixes.spray.nozzleCount} nozzle states per fix but the machine has ${boom.nozzleCount} nozzles`
		);
	}
	const cellPx = grid.cellSizeM / o.pixelM;
	if (!(o.pixelM > 0) || Math.abs(cellPx - Math.round(cellPx)) > 1e-9 * cellPx) {
		throw new Error(`coverage: pixel size ${o.pixelM} m must divide the cell size ${grid.cellSizeM} m`);
	}
	if (!(o.defaultRateLPerM2 >= 0)) throw new Error('coverage: defaultRateLPerM2 must be zero or more');
}

function rasterise(
	input: CoverageInput,
	region: Rings,
	win: Window,
	options: CoverageOptions
): CoverageResult {
	const o = { ...DEFAULTS, ...options } as Required<CoverageOptions>;
	checkInput(input, o);
	const { fixes, boom, grid, x, y } = input;
	const k = input.scaleFactor;
	const h = o.pixelM;
	const cellPx = Math.round(grid.cellSizeM / h);
	const pxAreaM2 = (h * h) / (k * k);
	const W = win.cols * cellPx;
	const wordsPerRow = (W + 31) >> 5;
	const wx0 = grid.originX + win.col0 * grid.cellSizeM;
	const wy0 = grid.originY + win.row0 * grid.cellSizeM;
	const n = fixes.count;
	const spray = fixes.spray;
	const time = fixes.timeS;
	const master = fixes.master;
	const rate = fixes.rateLPerM2;
	const flow = fixes.flowLPerS;

	// Pass 1: which intervals are drawn; totals that do not need the raster.
	const startCount = input.starts ? input.starts.length : Math.max(0, n - 1);
	const drawn = new Int32Array(startCount);
	let drawnCount = 0;
	let gaps = 0;
	let masterOff = 0;
	const maxSpeedProj = o.maxSpeedMPerS * k;
	for (let s = 0; s < startCount; s++) {
		const i = input.starts ? input.starts[s] : s;
		if (i + 1 >= n) continue;
		const dt = time[i + 1] - time[i];
		const ex = x[i + 1] - x[i];
		const ey = y[i + 1] - y[i];
		const dist = Math.sqrt(ex * ex + ey * ey);
		if (!(dt > 0) || dt > o.maxGapS || !(dist <= maxSpeedProj * dt)) {
			gaps++;
			continue;
		}
		if (master && master[i] === 0) {
			masterOff++;
			continue;
		}
		drawn[drawnCount++] = i;
	}

	// Band offsets in projected metres from the boom centre, negative = left.
	const halfBoomP = (boom.boomWidthM * k) / 2;
	const spacingP = boom.nozzleSpacingM * k;
	const nozzleCount = boom.nozzleCount;
	const bandLo = new Float64Array(nozzleCount + 1);
	const bandHi = new Float64Array(nozzleCount + 1);
	/** Sprayed bands of interval start i into bandLo/bandHi (projected metres); returns their count. */
	const bandsAt = (i: number): number => {
		if (spray.kind === 'nozzles') {
			const nw = spray.nozzleWords;
			const base = i * nw;
			let count = 0;
			let runStart = -1;
			let runEnd = -1;
			for (let wi = 0; wi < nw; wi++) {
				let w = spray.bits[base + wi];
				const bitBase = wi << 5;
				while (w !== 0) {
					const tz = 31 - Math.clz32(w & -w);
					const inv = ~(w >>> tz);
					const len = inv === 0 ? 32 - tz : Math.min(31 - Math.clz32(inv & -inv), 32 - tz);
					const start = bitBase + tz;
					const end = Math.min(start + len, nozzleCount);
					if (start >= nozzleCount) break;
					if (start === runEnd) runEnd = end;
					else {
						if (runStart >= 0) {
							bandLo[count] = runStart * spacingP - halfBoomP;
							bandHi[count++] = runEnd * spacingP - halfBoomP;
						}
						runStart = start;
						runEnd = end;
					}
					w = tz + len >= 32 ? 0 : w & (-1 << (tz + len));
				}
			}
			if (runStart >= 0) {
				bandLo[count] = runStart * spacingP - halfBoomP;
				bandHi[count++] = runEnd * spacingP - halfBoomP;
			}
			return count;
		}
		if (spray.kind === 'activeWidth') {
			const wP = Math.min(Math.max(spray.widthM[i], 0) * k, 2 * halfBoomP);
			if (!(wP > 0)) return 0;
			bandLo[0] = -wP / 2;
			bandHi[0] = wP / 2;
			return 1;
		}
		return 0;
	};
	const fractionAt = (i: number): number => {
		if (spray.kind !== 'fraction') return 0;
		const f = spray.fraction[i];
		return f > 0 ? Math.min(f, 1) : 0;
	};
	/** Liquid per projected m2 of sprayed band, from rate, else the default carrier rate; NaN = use flow. */
	const liquidPerProjM2 = (i: number): number => {
		const r = rate ? rate[i] : NaN;
		if (r >= 0) return r / (k * k);
		const f = flow ? flow[i] : NaN;
		if (f >= 0) return NaN;
		return o.defaultRateLPerM2 / (k * k);
	};

	// Analytic volume of every drawn interval (independent of the raster and its strips).
	let volumeDrawnL = 0;
	for (let s = 0; s < drawnCount; s++) {
		const i = drawn[s];
		const ex = x[i + 1] - x[i];
		const ey = y[i + 1] - y[i];
		const lenP = Math.sqrt(ex * ex + ey * ey);
		const bandAreaP = sprayedWidthP(i) * lenP;
		if (!(bandAreaP > 0)) continue;
		const lp = liquidPerProjM2(i);
		volumeDrawnL += Number.isNaN(lp) ? flow![i] * (time[i + 1] - time[i]) : lp * bandAreaP;
	}
	function sprayedWidthP(i: number): number {
		if (spray.kind === 'fraction') return fractionAt(i) * 2 * halfBoomP;
		if (spray.kind === 'activeWidth') return bandsAt(i) ? bandHi[0] - bandLo[0] : 0;
		// Merging neighbours into runs does not change the total width: count the open nozzles.
		const nw = spray.nozzleWords;
		let open = 0;
		for (let wi = 0; wi < nw; wi++) {
			let w = spray.bits[i * nw + wi];
			const last = nozzleCount - (wi << 5);
			if (last < 32) w &= last <= 0 ? 0 : (1 << last) - 1;
			open += popcount(w);
		}
		return open * spacingP;
	}

	// Strips of whole cell rows, sized so the two bit rasters fit the memory budget.
	const bytesPerCellRow = 2 * wordsPerRow * 4 * cellPx;
	const stripCellRows = Math.max(1, Math.min(win.rows, Math.floor(o.maxRasterBytes / bytesPerCellRow)));
	const stripRowsMax = stripCellRows * cellPx;
	const covered = new Int32Array(stripRowsMax * wordsPerRow);
	const sprayed = new Int32Array(stripRowsMax * wordsPerRow);
	const cellsPerStrip = stripCellRows * win.cols;
	const cellRegionPx = new Int32Array(cellsPerStrip);
	const cellCovered = new Int32Array(cellsPerStrip);
	const cellSprayed = new Int32Array(cellsPerStrip);
	const cellVolume = new Float64Array(cellsPerStrip);
	const cellInside = new Uint8Array(cellsPerStrip);
	const spanStart = new Int32Array(stripRowsMax + 1);
	let spans = new Int32Array(4 * stripRowsMax);

	const edges = buildEdges(region, wx0, wy0, h);
	const cells: CellFigures[] = [];
	let coveredPx = 0;
	let sprayedPx = 0;
	let volumeL = 0;
	const cellPxArea = cellPx * cellPx;
	// Cell of pixel c is ((c + 0.5) * invCellPx) | 0: the half pixel keeps the truncation exact
	// whatever the rounding of 1 / cellPx, and a multiply is cheaper than a divide per row.
	const invCellPx = 1 / cellPx;

	// Strip state read by fillRect.
	let stripRow0 = 0;
	let stripRows = 0;

	/**
	 * Sets the pixels whose centres lie in the rectangle s in [0, lenPx] along (dx, dy) from
	 * (px, py), t in [t0, t1] to its right (all in pixel units of the window). With volPerPx > 0
	 * adds that much liquid per set pixel inside the region to its cell; with level >= 0 sets only
	 * the dither pattern of that level.
	 */
	const fillRect = (
		target: Int32Array,
		px: number,
		py: number,
		dx: number,
		dy: number,
		lenPx: number,
		t0: number,
		t1: number,
		volPerPx: number,
		level: number
	) => {
		// Corners: p + s d + t r with r = (dy, -dx).
		const vA = py - t0 * dx;
		const vB = py - t1 * dx;
		const vC = vA + lenPx * dy;
		const vD = vB + lenPx * dy;
		const vMin = Math.min(vA, vB, vC, vD) - stripRow0;
		const vMax = Math.max(vA, vB, vC, vD) - stripRow0;
		let r0 = Math.ceil(vMin - 0.5);
		let r1 = Math.floor(vMax - 0.5);
		if (r0 < 0) r0 = 0;
		if (r1 >= stripRows) r1 = stripRows - 1;
		if (r0 > r1) return;
		// Near-axis travel: a tiny slope keeps the closed form branch-free and changes nothing visible.
		const ddx = Math.abs(dx) < 1e-12 ? 1e-12 : dx;
		const ddy = Math.abs(dy) < 1e-12 ? 1e-12 : dy;
		const idx = 1 / ddx;
		const idy = 1 / ddy;
		// Per row the pixel-centre range is [max(a + aLo, b + bLo), min(a + aHi, b + bHi)], with a
		// and b moving by fixed steps from row to row (the rectangle's two pairs of sides).
		const aSpan = lenPx * idx;
		const aLo = (aSpan < 0 ? aSpan : 0) + px - 0.5;
		const aHi = (aSpan > 0 ? aSpan : 0) + px - 0.5;
		const bSpan = (t1 - t0) * idy;
		const bLo = (bSpan < 0 ? bSpan : 0) + px - 0.5;
		const bHi = (bSpan > 0 ? bSpan : 0) + px - 0.5;
		const bv0 = r0 + stripRow0 + 0.5 - py;
		const aStep = -ddy * idx;
		const bStep = ddx * idy;
		let a = bv0 * aStep;
		let b = (t0 + bv0 * ddx) * idy;
		const patBase = level >= 0 ? level : -1;
		for (let r = r0; r <= r1; r++, a += aStep, b += bStep) {
			const lo = a + aLo > b + bLo ? a + aLo : b + bLo;
			const hi = a + aHi < b + bHi ? a + aHi : b + bHi;
			let c0 = Math.ceil(lo);
			let c1 = Math.floor(hi);
			if (c0 < 0) c0 = 0;
			if (c1 >= W) c1 = W - 1;
			if (c0 > c1) continue;
			const base = r * wordsPerRow;
			const w0 = c0 >> 5;
			const w1 = c1 >> 5;
			const pat =
				patBase >= 0 ? ditherWords[((r + stripRow0) & 15) * (DITHER_LEVELS + 1) + patBase] : -1;
			const m0 = -1 << (c0 & 31);
			const m1 = -1 >>> (31 - (c1 & 31));
			if (w0 === w1) target[base + w0] |= m0 & m1 & pat;
			else {
				target[base + w0] |= m0 & pat;
				for (let w = w0 + 1; w < w1; w++) target[base + w] |= pat;
				target[base + w1] |= m1 & pat;
			}
			if (volPerPx > 0) {
				const cr = (((r + 0.5) * invCellPx) | 0) * win.cols;
				const cc0 = ((c0 + 0.5) * invCellPx) | 0;
				// Most bands lie inside one cell that lies wholly inside the region.
				if (cc0 === (((c1 + 0.5) * invCellPx) | 0) && cellInside[cr + cc0]) {
					cellVolume[cr + cc0] += (c1 - c0 + 1) * volPerPx;
				} else addVolume(r, c0, c1, volPerPx);
			}
		}
	};

	const addVolume = (r: number, c0: number, c1: number, volPerPx: number) => {
		const cellRowBase = ((r / cellPx) | 0) * win.cols;
		const cc0 = (c0 / cellPx) | 0;
		const cc1 = (c1 / cellPx) | 0;
		for (let cc = cc0; cc <= cc1; cc++) {
			const ci = cellRowBase + cc;
			const a = cc === cc0 ? c0 : cc * cellPx;
			const b = cc === cc1 ? c1 : cc * cellPx + cellPx - 1;
			if (cellInside[ci]) {
				cellVolume[ci] += (b - a + 1) * volPerPx;
				continue;
			}
			if (cellRegionPx[ci] === 0) continue;
			for (let s = spanStart[r]; s < spanStart[r + 1]; s += 2) {
				const lo = Math.max(a, spans[s]);
				const hi = Math.min(b, spans[s + 1]);
				if (lo <= hi) cellVolume[ci] += (hi - lo + 1) * volPerPx;
			}
		}
	};

	for (let stripCell0 = 0; stripCell0 < win.rows; stripCell0 += stripCellRows) {
		const stripCells = Math.min(stripCellRows, win.rows - stripCell0);
		stripRow0 = stripCell0 * cellPx;
		stripRows = stripCells * cellPx;
		covered.fill(0);
		sprayed.fill(0);
		cellRegionPx.fill(0);
		cellCovered.fill(0);
		cellSprayed.fill(0);
		cellVolume.fill(0);

		// Region spans per pixel row (pixel-centre sampling, the same as the footprints).
		spans = regionSpans(edges, stripRow0, stripRows, W, spanStart, spans);
		for (let r = 0; r < stripRows; r++) {
			const cellRowBase = ((r / cellPx) | 0) * win.cols;
			for (let s = spanStart[r]; s < spanStart[r + 1]; s += 2) {
				for (let c = spans[s]; c <= spans[s + 1]; ) {
					const cc = (c / cellPx) | 0;
					const end = Math.min(spans[s + 1], cc * cellPx + cellPx - 1);
					cellRegionPx[cellRowBase + cc] += end - c + 1;
					c = end + 1;
				}
			}
		}
		for (let ci = 0; ci < stripCells * win.cols; ci++) cellInside[ci] = cellRegionPx[ci] === cellPxArea ? 1 : 0;

		const yLo = wy0 + stripRow0 * h;
		const yHi = yLo + stripRows * h;
		const xHi = wx0 + W * h;
		for (let s = 0; s < drawnCount; s++) {
			const i = drawn[s];
			const x0 = x[i];
			const y0 = y[i];
			const ex = x[i + 1] - x0;
			const ey = y[i + 1] - y0;
			const lenP = Math.sqrt(ex * ex + ey * ey);
			if (lenP === 0) continue;
			const dx = ex / lenP;
			const dy = ey / lenP;
			const reachX = halfBoomP * Math.abs(dy);
			const reachY = halfBoomP * Math.abs(dx);
			if (Math.min(y0, y0 + ey) - reachY > yHi || Math.max(y0, y0 + ey) + reachY < yLo) continue;
			if (Math.min(x0, x0 + ex) - reachX > xHi || Math.max(x0, x0 + ex) + reachX < wx0) continue;
			const px = (x0 - wx0) / h;
			const py = (y0 - wy0) / h;
			const lenPx = lenP / h;
			fillRect(covered, px, py, dx, dy, lenPx, -halfBoomP / h, halfBoomP / h, 0, -1);
			let lp = liquidPerProjM2(i);
			if (spray.kind === 'fraction') {
				const f = fractionAt(i);
				if (f <= 0) continue;
				if (Number.isNaN(lp)) lp = (flow![i] * (time[i + 1] - time[i])) / (f * 2 * halfBoomP * lenP);
				const level = Math.round(f * DITHER_LEVELS);
				fillRect(sprayed, px, py, dx, dy, lenPx, -halfBoomP / h, halfBoomP / h, 0, level);
				// Volume follows the fraction, not the dither, so it sums to rate x fraction x area.
				fillRect(sprayed, px, py, dx, dy, lenPx, -halfBoomP / h, halfBoomP / h, lp * f * h * h, 0);
				continue;
			}
			const nb = bandsAt(i);
			if (nb === 0) continue;
			if (Number.isNaN(lp)) {
				let wP = 0;
				for (let b = 0; b < nb; b++) wP += bandHi[b] - bandLo[b];
				lp = (flow![i] * (time[i + 1] - time[i])) / (wP * lenP);
			}
			const volPerPx = lp * h * h;
			for (let b = 0; b < nb; b++) {
				fillRect(sprayed, px, py, dx, dy, lenPx, bandLo[b] / h, bandHi[b] / h, volPerPx, -1);
			}
		}

		// Count inside the region, split at cell boundaries.
		for (let r = 0; r < stripRows; r++) {
			const cellRowBase = ((r / cellPx) | 0) * win.cols;
			const base = r * wordsPerRow;
			for (let s = spanStart[r]; s < spanStart[r + 1]; s += 2) {
				for (let c = spans[s]; c <= spans[s + 1]; ) {
					const cc = (c / cellPx) | 0;
					const end = Math.min(spans[s + 1], cc * cellPx + cellPx - 1);
					cellCovered[cellRowBase + cc] += countBits(covered, base, c, end);
					cellSprayed[cellRowBase + cc] += countBits(sprayed, base, c, end);
					c = end + 1;
				}
			}
		}
		for (let cr = 0; cr < stripCells; cr++) {
			for (let cc = 0; cc < win.cols; cc++) {
				const ci = cr * win.cols + cc;
				if (cellRegionPx[ci] === 0) continue;
				coveredPx += cellCovered[ci];
				sprayedPx += cellSprayed[ci];
				volumeL += cellVolume[ci];
				cells.push({
					col: win.col0 + cc,
					row: win.row0 + stripCell0 + cr,
					areaM2: cellRegionPx[ci] * pxAreaM2,
					coveredM2: cellCovered[ci] * pxAreaM2,
					sprayedM2: cellSprayed[ci] * pxAreaM2,
					volumeL: cellVolume[ci]
				});
			}
		}
	}

	return {
		totals: {
			areaM2: ringsAreaM2(region) / (k * k),
			coveredM2: coveredPx * pxAreaM2,
			sprayedM2: sprayedPx * pxAreaM2,
			volumeL,
			volumeDrawnL,
			intervals: drawnCount,
			gaps,
			masterOff
		},
		cells
	};
}

type Edges = { x0: Float64Array; y0: Float64Array; x1: Float64Array; y1: Float64Array; count: number };

/** Region edges in window pixel units, oriented upwards (y0 < y1), horizontal edges dropped. */
function buildEdges(region: Rings, wx0: number, wy0: number, h: number): Edges {
	let total = 0;
	for (const r of region) total += r.length >> 1;
	const e = {
		x0: new Float64Array(total),
		y0: new Float64Array(total),
		x1: new Float64Array(total),
		y1: new Float64Array(total),
		count: 0
	};
	for (const r of region) {
		const m = r.length >> 1;
		for (let i = 0; i < m; i++) {
			const j = i + 1 === m ? 0 : i + 1;
			let ax = (r[2 * i] - wx0) / h;
			let ay = (r[2 * i + 1] - wy0) / h;
			let bx = (r[2 * j] - wx0) / h;
			let by = (r[2 * j + 1] - wy0) / h;
			if (ay === by) continue;
			if (ay > by) [ax, ay, bx, by] = [bx, by, ax, ay];
			e.x0[e.count] = ax;
			e.y0[e.count] = ay;
			e.x1[e.count] = bx;
			e.y1[e.count] = by;
			e.count++;
		}
	}
	return e;
}

/**
 * Even-odd spans of pixel centres inside the region for rows [row0, row0 + rows) of the window:
 * row r's spans are spans[spanStart[r] .. spanStart[r + 1]) as inclusive [c0, c1] pairs.
 */
function regionSpans(
	e: Edges,
	row0: number,
	rows: number,
	W: number,
	spanStart: Int32Array,
	spans: Int32Array<ArrayBuffer>
): Int32Array<ArrayBuffer> {
	// Edges bucketed by their first pixel row so each row only meets the edges crossing it.
	const firstRow = new Int32Array(e.count);
	const bucketStart = new Int32Array(rows + 2);
	for (let i = 0; i < e.count; i++) {
		let fr = Math.ceil(e.y0[i] - 0.5) - row0;
		if (fr < 0) fr = 0;
		firstRow[i] = fr;
		if (fr < rows) bucketStart[fr + 1]++;
	}
	for (let r = 0; r < rows; r++) bucketStart[r + 1] += bucketStart[r];
	const bucket = new Int32Array(bucketStart[rows]);
	const fill = bucketStart.slice();
	for (let i = 0; i < e.count; i++) if (firstRow[i] < rows) bucket[fill[firstRow[i]]++] = i;

	let active: number[] = [];
	const xs: number[] = [];
	let n = 0;
	for (let r = 0; r < rows; r++) {
		const yc = row0 + r + 0.5;
		for (let b = bucketStart[r]; b < bucketStart[r + 1]; b++) active.push(bucket[b]);
		active = active.filter((i) => e.y1[i] > yc);
		xs.length = 0;
		for (const i of active) {
			if (e.y0[i] <= yc) xs.push(e.x0[i] + ((yc - e.y0[i]) * (e.x1[i] - e.x0[i])) / (e.y1[i] - e.y0[i]));
		}
		xs.sort((a, b) => a - b);
		spanStart[r] = n;
		for (let j = 0; j + 1 < xs.length; j += 2) {
			let c0 = Math.ceil(xs[j] - 0.5);
			let c1 = Math.floor(xs[j + 1] - 0.5);
			if (c0 < 0) c0 = 0;
			if (c1 >= W) c1 = W - 1;
			if (c0 > c1) continue;
			if (n + 2 > spans.length) {
				const grown = new Int32Array(spans.length * 2);
				grown.set(spans);
				spans = grown;
			}
			spans[n++] = c0;
			spans[n++] = c1;
		}
	}
	spanStart[rows] = n;
	return spans;
}
