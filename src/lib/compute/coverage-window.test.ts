import { expect, test } from 'vitest';
import { computeCoverage } from './coverage';
import { arc, buildLog, inventPatches, ring, seededRandom } from './testing/synthetic';
import type { BoomGeometry, GridSpec } from './types';

// Windowing is an optimisation: the figures must be the same as drawing the whole field.
const boom: BoomGeometry = { boomWidthM: 5, nozzleCount: 10, nozzleSpacingM: 0.5 };
const X0 = 500_000;
const Y0 = 5_200_000;
const field = [ring([[X0, Y0], [X0 + 400, Y0], [X0 + 400, Y0 + 300], [X0, Y0 + 300]])];
const grid: GridSpec = { proj: '+proj=utm +zone=11 +datum=WGS84 +units=m +no_defs', epsg: 32611, cellSizeM: 10, originX: X0, originY: Y0, cols: 40, rows: 30 };

test('a log over one corner of a field gives the same totals and cells with the window as without', () => {
	const rand = seededRandom(7);
	const patches = inventPatches(rand, 12, [X0 + 20, Y0 + 20, X0 + 120, Y0 + 90], [1, 4]);
	const passes = [
		[[X0 + 10, Y0 + 20], [X0 + 130, Y0 + 20]],
		[[X0 + 130, Y0 + 25], [X0 + 10, Y0 + 25]],
		arc(X0 + 60, Y0 + 60, 30, 0, Math.PI)
	];
	const log = buildLog(passes, boom, patches);
	const input = { x: log.x, y: log.y, fixes: log.fixes, boom, scaleFactor: 1, grid };
	const whole = computeCoverage(input, field, { defaultRateLPerM2: 0.01 });
	const windowed = computeCoverage(input, field, { defaultRateLPerM2: 0.01, windowToFixes: true });
	expect(whole.totals.coveredM2).toBeGreaterThan(1000);
	expect(windowed.totals).toEqual(whole.totals);
	const key = (c: { col: number; row: number }) => `${c.col},${c.row}`;
	const covered = (cells: typeof whole.cells) => new Map(cells.filter((c) => c.coveredM2 > 0).map((c) => [key(c), c]));
	expect(covered(windowed.cells)).toEqual(covered(whole.cells));
});
