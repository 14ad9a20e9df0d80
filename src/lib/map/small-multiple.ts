// A field's season as a small SVG map: its grid cells (or blocks of span x span cells) coloured
// with the map's treated-share ramp, thinly covered cells hatched as on the map, and the boundary.
// Drawn in grid units (one block = 1), north up, so several seasons of one field line up.
// Neighbouring blocks of one colour in a row merge into one rectangle, which keeps a 12,000-cell
// field to a few thousand path commands: light to send and to print.
import { colourAt, MIN_COVER, shareStops, type Stop } from './ramps';

export type SmallCell = { col: number; row: number; coveredM2: number; sprayedM2: number; cover: number };
export type SmallGrid = { cols: number; rows: number; originX: number; originY: number; cellSizeM: number };

export type SmallMultiple = {
	/** viewBox size in blocks. */
	width: number;
	height: number;
	/** One path per colour, in drawing order. */
	fills: { colour: string; d: string }[];
	/** Blocks driven over on less than MIN_COVER of their area: hatched, never shown as zero. */
	hatch: string;
	/** The boundary's rings (outer and holes, even-odd). */
	outline: string;
};

/** Treated share is drawn in steps of this many percent: finer than the eye tells apart on a small map. */
export const SHARE_STEP_PERCENT = 2.5;

const hex = ([r, g, b]: [number, number, number]) => `#${[r, g, b].map((c) => c.toString(16).padStart(2, '0')).join('')}`;

/** The colour a share (percent) is drawn in, after rounding to the step. */
export function shareColour(sharePercent: number, stops: readonly Stop[] = shareStops): string {
	const stepped = Math.round(sharePercent / SHARE_STEP_PERCENT) * SHARE_STEP_PERCENT;
	return hex(colourAt(stops, stepped));
}

/** Runs of equal keys along each row as rectangle commands, rows top to bottom. */
function runs(blocks: Map<number, Map<number, string>>, key: string, height: number): string {
	let d = '';
	for (const [by, row] of blocks) {
		const xs = [...row].filter(([, k]) => k === key).map(([bx]) => bx).sort((a, b) => a - b);
		const y = height - 1 - by;
		for (let i = 0; i < xs.length; ) {
			let j = i;
			while (j + 1 < xs.length && xs[j + 1] === xs[j] + 1) j++;
			d += `M${xs[i]} ${y}h${j - i + 1}v1h${-(j - i + 1)}z`;
			i = j + 1;
		}
	}
	return d;
}

/**
 * The small map of one season. `cells` are full cells (span 1) or blocks keyed by their
 * lower-left cell (as cellRows returns them); `rings` are the boundary in the grid's projection.
 */
export function smallMultiple(cells: SmallCell[], grid: SmallGrid, span: number, rings: ArrayLike<number>[]): SmallMultiple {
	if (!Number.isInteger(span) || span < 1) throw new Error(`smallMultiple: span must be a positive integer, got ${span}`);
	const width = Math.ceil(grid.cols / span);
	const height = Math.ceil(grid.rows / span);
	const HATCH = 'hatch';
	const blocks = new Map<number, Map<number, string>>();
	const keys = new Set<string>();
	for (const c of cells) {
		if (!(c.coveredM2 > 0)) continue;
		const key = c.cover < MIN_COVER ? HATCH : shareColour((100 * c.sprayedM2) / c.coveredM2);
		const by = Math.floor(c.row / span);
		let row = blocks.get(by);
		if (!row) blocks.set(by, (row = new Map()));
		row.set(Math.floor(c.col / span), key);
		keys.add(key);
	}
	// Blocks never overlap, so order is only for reading the SVG: light to dark, as in the legend.
	const colours = [...keys].filter((k) => k !== HATCH).sort((a, b) => parseInt(b.slice(1), 16) - parseInt(a.slice(1), 16));
	const unit = grid.cellSizeM * span;
	const r2 = (v: number) => Math.round(v * 100) / 100;
	const outline = rings
		.map((ring) => {
			let d = '';
			for (let i = 0; i + 1 < ring.length; i += 2) {
				const x = r2((ring[i] - grid.originX) / unit);
				const y = r2(height - (ring[i + 1] - grid.originY) / unit);
				d += `${i === 0 ? 'M' : 'L'}${x} ${y}`;
			}
			return `${d}Z`;
		})
		.join('');
	return {
		width,
		height,
		fills: colours.map((colour) => ({ colour, d: runs(blocks, colour, height) })),
		hatch: keys.has(HATCH) ? runs(blocks, HATCH, height) : '',
		outline
	};
}

/** The span that keeps a grid to at most `maxBlocks` blocks across its longer side. */
export function spanFor(grid: { cols: number; rows: number }, maxBlocks = 120): number {
	return Math.max(1, Math.ceil(Math.max(grid.cols, grid.rows) / maxBlocks));
}
