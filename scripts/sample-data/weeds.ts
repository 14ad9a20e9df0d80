// Invented weed patches across three seasons, and the 0.5 m weed raster a sensor "sees" during
// one application. The story: patches along field edges and in low spots, a few that persist all
// three seasons, streaks that stretch and move along the tillage direction, a Coyote Draw hotspot
// that a targeted residual in June 2025 clears by 2026, and a sparse scattered background.
import type { Xy } from './frame';
import type { DemoField } from './layout';
import { between, gaussian, randomFor } from './random';

export type Season = 2024 | 2025 | 2026;
export const SEASONS: Season[] = [2024, 2025, 2026];
export type Pass = 'spring' | 'june';

/** An ellipse of weeds: half-axes a (along rot) and b, density 0..1 of 0.5 m pixels at its centre. */
type Ellipse = { x: number; y: number; a: number; b: number; rot: number; density: number };

type Patch = {
	kind: 'edge' | 'low' | 'streak' | 'transient' | 'hotspot';
	/** Perennial patches come back in the June pass too; annual flushes mostly do not. */
	perennial: boolean;
	bySeason: Partial<Record<Season, Ellipse>>;
};

/** How weedy each field is, per season: edge patches per km of boundary, low spots, streaks
 * along the tillage direction, one-season patches, background weeds per hectare. */
type Pressure = {
	edgePerKm: number;
	lowSpots: number;
	streaks: number;
	transients: number;
	backgroundPerHa: Record<Season, number>;
	/** Scales every patch of the field. */
	size: number;
	/** Scales every patch's size per season: a field getting weedier or cleaner. */
	trend: Record<Season, number>;
};

const PRESSURE: Record<string, Pressure> = {
	'North Flat': { edgePerKm: 5, lowSpots: 3, streaks: 1, transients: 6, size: 1.5, backgroundPerHa: { 2024: 90, 2025: 80, 2026: 70 }, trend: { 2024: 1.1, 2025: 1, 2026: 0.9 } },
	Schoolhouse: { edgePerKm: 5, lowSpots: 2, streaks: 5, transients: 4, size: 1.6, backgroundPerHa: { 2024: 110, 2025: 130, 2026: 150 }, trend: { 2024: 0.9, 2025: 1, 2026: 1.1 } },
	'Coyote Draw': { edgePerKm: 6, lowSpots: 4, streaks: 1, transients: 6, size: 1.7, backgroundPerHa: { 2024: 140, 2025: 170, 2026: 110 }, trend: { 2024: 1, 2025: 1.1, 2026: 0.85 } },
	'Wetland Quarter': { edgePerKm: 6, lowSpots: 6, streaks: 1, transients: 6, size: 1.8, backgroundPerHa: { 2024: 160, 2025: 170, 2026: 160 }, trend: { 2024: 1, 2025: 1.05, 2026: 1 } },
	'Home Place': { edgePerKm: 8, lowSpots: 2, streaks: 1, transients: 3, size: 1.8, backgroundPerHa: { 2024: 180, 2025: 170, 2026: 160 }, trend: { 2024: 1, 2025: 1, 2026: 1 } },
	'Split Forty': { edgePerKm: 3, lowSpots: 1, streaks: 0, transients: 2, size: 1.2, backgroundPerHa: { 2024: 70, 2025: 60, 2026: 60 }, trend: { 2024: 1, 2025: 0.9, 2026: 0.9 } },
	'Long Hill': { edgePerKm: 4, lowSpots: 5, streaks: 7, transients: 8, size: 1.6, backgroundPerHa: { 2024: 100, 2025: 120, 2026: 130 }, trend: { 2024: 0.9, 2025: 1, 2026: 1.1 } },
	Railside: { edgePerKm: 5, lowSpots: 1, streaks: 1, transients: 3, size: 1.6, backgroundPerHa: { 2024: 100, 2025: 110, 2026: 110 }, trend: { 2024: 1, 2025: 1, 2026: 1.05 } },
	'East Bench': { edgePerKm: 2, lowSpots: 1, streaks: 1, transients: 3, size: 1.1, backgroundPerHa: { 2024: 60, 2025: 50, 2026: 50 }, trend: { 2024: 1, 2025: 1, 2026: 0.95 } },
	'Little Draw': { edgePerKm: 5, lowSpots: 3, streaks: 0, transients: 2, size: 1.7, backgroundPerHa: { 2024: 130, 2025: 140, 2026: 140 }, trend: { 2024: 1, 2025: 1.1, 2026: 1.1 } },
	'Creek Bottom': { edgePerKm: 6, lowSpots: 3, streaks: 0, transients: 3, size: 1.6, backgroundPerHa: { 2024: 150, 2025: 150, 2026: 150 }, trend: { 2024: 1, 2025: 1, 2026: 1 } },
	'Upper Bench': { edgePerKm: 3, lowSpots: 1, streaks: 2, transients: 3, size: 1.3, backgroundPerHa: { 2024: 80, 2025: 80, 2026: 80 }, trend: { 2024: 1, 2025: 1, 2026: 1 } }
};

type Bbox = { minE: number; minN: number; maxE: number; maxN: number };

function bboxOf(field: DemoField): Bbox {
	const b = { minE: Infinity, minN: Infinity, maxE: -Infinity, maxN: -Infinity };
	for (const part of field.parts)
		for (const [e, n] of part[0]) {
			b.minE = Math.min(b.minE, e);
			b.minN = Math.min(b.minN, n);
			b.maxE = Math.max(b.maxE, e);
			b.maxN = Math.max(b.maxN, n);
		}
	return b;
}

function allRings(field: DemoField): Xy[][] {
	return field.parts.flat();
}

function inside(rings: Xy[][], x: number, y: number): boolean {
	let c = false;
	for (const ring of rings)
		for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
			const [xi, yi] = ring[i];
			const [xj, yj] = ring[j];
			if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) c = !c;
		}
	return c;
}

/** A point inside the field, away from its edges and holes by at least `margin` metres (tried). */
function randomInside(field: DemoField, rand: () => number, margin: number): Xy {
	const b = bboxOf(field);
	const rings = allRings(field);
	for (let k = 0; ; k++) {
		const x = between(rand, b.minE, b.maxE);
		const y = between(rand, b.minN, b.maxN);
		if (!inside(rings, x, y)) continue;
		const ok = [0, 1, 2, 3].every((q) => inside(rings, x + margin * Math.cos((q * Math.PI) / 2), y + margin * Math.sin((q * Math.PI) / 2)));
		if (ok || k > 200) return [x, y];
	}
}

function perimeterEdges(field: DemoField): { a: Xy; b: Xy; len: number }[] {
	const edges: { a: Xy; b: Xy; len: number }[] = [];
	for (const part of field.parts)
		for (const ring of part)
			for (let i = 0; i < ring.length; i++) {
				const a = ring[i];
				const b = ring[(i + 1) % ring.length];
				edges.push({ a, b, len: Math.hypot(b[0] - a[0], b[1] - a[1]) });
			}
	return edges;
}

/** The same patch in three seasons, each a little different, absent where scale is 0. */
function acrossSeasons(base: Ellipse, rand: () => number, scales: Record<Season, number>, trend: Record<Season, number>): Partial<Record<Season, Ellipse>> {
	const out: Partial<Record<Season, Ellipse>> = {};
	for (const s of SEASONS) {
		if (scales[s] <= 0) continue;
		const k = scales[s] * trend[s] * between(rand, 0.85, 1.15);
		out[s] = { ...base, a: base.a * k, b: base.b * k, x: base.x + gaussian(rand) * 4, y: base.y + gaussian(rand) * 4, density: base.density * between(rand, 0.8, 1.2) };
	}
	return out;
}

/** Every season on, or a random run of one or two seasons. */
function presence(rand: () => number, persistentShare: number): Record<Season, number> {
	if (rand() < persistentShare) return { 2024: 1, 2025: 1, 2026: 1 };
	const r = rand();
	if (r < 0.25) return { 2024: 1, 2025: 0, 2026: 0 };
	if (r < 0.45) return { 2024: 1, 2025: 1, 2026: 0 };
	if (r < 0.7) return { 2024: 0, 2025: 1, 2026: 1 };
	return { 2024: 0, 2025: 0, 2026: 1 };
}

function fieldPatches(field: DemoField): Patch[] {
	const p = PRESSURE[field.name];
	if (!p) throw new Error(`no weed pressure set for "${field.name}"`);
	const rand = randomFor(`patches/${field.name}`);
	const patches: Patch[] = [];
	const rings = allRings(field);
	const along = ((90 - field.passAngleDeg) * Math.PI) / 180; // pass direction as a math angle

	// Edge patches: blown in from road verges and fence lines, lying along the edge.
	const edges = perimeterEdges(field);
	const perimeterM = edges.reduce((s, e) => s + e.len, 0);
	const nEdge = Math.round((1.5 * p.edgePerKm * perimeterM) / 1000);
	for (let k = 0; k < nEdge; k++) {
		let pick = rand() * perimeterM;
		const e = edges.find((x) => (pick -= x.len) < 0) ?? edges[edges.length - 1];
		const t = rand();
		const dx = (e.b[0] - e.a[0]) / e.len;
		const dy = (e.b[1] - e.a[1]) / e.len;
		// Inward is left of a counter-clockwise outer ring and of a clockwise hole alike.
		const inset = between(rand, 4, 30);
		const x = e.a[0] + dx * t * e.len - dy * inset;
		const y = e.a[1] + dy * t * e.len + dx * inset;
		if (!inside(rings, x, y)) continue;
		const a = between(rand, 15, 70) * p.size;
		const base = { x, y, a, b: between(rand, 6, 18) * p.size, rot: Math.atan2(dy, dx), density: between(rand, 0.08, 0.4) };
		patches.push({ kind: 'edge', perennial: rand() < 0.6, bySeason: acrossSeasons(base, rand, presence(rand, 0.55), p.trend) });
	}
	// Low spots: round, dense, back every season.
	for (let k = 0; k < p.lowSpots; k++) {
		const [x, y] = randomInside(field, rand, 60);
		const a = between(rand, 25, 65) * p.size;
		const base = { x, y, a, b: a * between(rand, 0.6, 0.95), rot: rand() * Math.PI, density: between(rand, 0.15, 0.45) };
		patches.push({ kind: 'low', perennial: true, bySeason: acrossSeasons(base, rand, presence(rand, 0.85), p.trend) });
	}
	// Streaks: seed and roots dragged along the tillage and harvest direction; each season longer
	// and further along.
	for (let k = 0; k < p.streaks; k++) {
		const [x, y] = randomInside(field, rand, 120);
		const a = between(rand, 30, 60) * p.size;
		const b = between(rand, 8, 16) * p.size;
		const dir = rand() < 0.5 ? 1 : -1;
		const density = between(rand, 0.12, 0.35);
		const bySeason: Partial<Record<Season, Ellipse>> = {};
		SEASONS.forEach((s, i) => {
			const len = a * (1 + 0.8 * i);
			const shift = dir * (len - a) * 0.7;
			const cx = x + Math.cos(along) * shift;
			const cy = y + Math.sin(along) * shift;
			if (inside(rings, cx, cy)) bySeason[s] = { x: cx, y: cy, a: len, b: b * (1 + 0.15 * i), rot: along, density };
		});
		patches.push({ kind: 'streak', perennial: true, bySeason });
	}
	// One-season flushes.
	for (let k = 0; k < p.transients; k++) {
		const [x, y] = randomInside(field, rand, 40);
		const s = SEASONS[Math.floor(rand() * 3)];
		const a = between(rand, 15, 45) * p.size;
		patches.push({ kind: 'transient', perennial: false, bySeason: { [s]: { x, y, a, b: a * between(rand, 0.4, 0.9), rot: rand() * Math.PI, density: between(rand, 0.05, 0.3) } } });
	}
	if (field.name === 'Coyote Draw') {
		// Kochia in the low ground by the draw: a small patch in 2024, a hotspot in 2025, treated
		// with the residual in June 2025, gone in 2026.
		const y = 2350;
		const x = 2380;
		patches.push({
			kind: 'hotspot',
			perennial: true,
			bySeason: {
				2024: { x, y, a: 40, b: 22, rot: Math.PI / 2, density: 0.25 },
				2025: { x: x - 20, y: y + 30, a: 120, b: 65, rot: Math.PI / 2, density: 0.4 }
			}
		});
	}
	if (field.name === 'Wetland Quarter') {
		// A ring of perennial patches around the wetland margin.
		const hole = field.parts[0][1];
		const cx = hole.reduce((s, q) => s + q[0], 0) / hole.length;
		const cy = hole.reduce((s, q) => s + q[1], 0) / hole.length;
		for (let k = 0; k < 9; k++) {
			const t = (2 * Math.PI * k) / 9 + rand() * 0.3;
			const base = { x: cx + 225 * Math.cos(t), y: cy + 170 * Math.sin(t), a: between(rand, 25, 45), b: between(rand, 10, 18), rot: t + Math.PI / 2, density: between(rand, 0.2, 0.4) };
			patches.push({ kind: 'low', perennial: true, bySeason: acrossSeasons(base, rand, { 2024: 1, 2025: 1, 2026: 1 }, p.trend) });
		}
	}
	return patches;
}

const PATCHES = new Map<string, Patch[]>();
function patchesOf(field: DemoField): Patch[] {
	let p = PATCHES.get(field.name);
	if (!p) PATCHES.set(field.name, (p = fieldPatches(field)));
	return p;
}

/** Weeds at 0.5 m over one field's bounding box: 1 where a green weed stands. */
export type WeedRaster = { minE: number; minN: number; cols: number; rows: number; data: Uint8Array };
export const WEED_PIXEL_M = 0.5;

/** Scanline fill of the field (all parts, holes out): 1 inside. */
function fieldMask(field: DemoField, r: WeedRaster): Uint8Array {
	const mask = new Uint8Array(r.cols * r.rows);
	const rings = allRings(field);
	const xs: number[] = [];
	for (let row = 0; row < r.rows; row++) {
		const y = r.minN + (row + 0.5) * WEED_PIXEL_M;
		xs.length = 0;
		for (const ring of rings)
			for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
				const [xi, yi] = ring[i];
				const [xj, yj] = ring[j];
				if (yi > y !== yj > y) xs.push(xi + ((y - yi) * (xj - xi)) / (yj - yi));
			}
		xs.sort((a, b) => a - b);
		for (let k = 0; k + 1 < xs.length; k += 2) {
			const c0 = Math.max(0, Math.ceil((xs[k] - r.minE) / WEED_PIXEL_M - 0.5));
			const c1 = Math.min(r.cols - 1, Math.floor((xs[k + 1] - r.minE) / WEED_PIXEL_M - 0.5));
			mask.fill(1, row * r.cols + c0, row * r.cols + c1 + 1);
		}
	}
	return mask;
}

/** What the sensors meet on one field in one pass of one season. Deterministic per name. */
export function weedRaster(field: DemoField, season: Season, pass: Pass): WeedRaster {
	const b = bboxOf(field);
	const minE = Math.floor(b.minE) - 2;
	const minN = Math.floor(b.minN) - 2;
	const cols = Math.ceil((b.maxE + 2 - minE) / WEED_PIXEL_M);
	const rows = Math.ceil((b.maxN + 2 - minN) / WEED_PIXEL_M);
	const r: WeedRaster = { minE, minN, cols, rows, data: new Uint8Array(cols * rows) };
	const rand = randomFor(`weeds/${field.name}/${season}/${pass}`);
	const p = PRESSURE[field.name];
	for (const patch of patchesOf(field)) {
		const e = patch.bySeason[season];
		if (!e) continue;
		// June: perennials regrow, most spring flushes were killed by the burndown.
		let density = e.density * between(rand, 0.8, 1.1);
		if (pass === 'june') {
			if (!patch.perennial && rand() < 0.7) continue;
			density *= between(rand, 0.5, 0.9);
		}
		paintEllipse(r, e, density, rand);
	}
	const areaPx = r.cols * r.rows;
	const mask = fieldMask(field, r);
	let insidePx = 0;
	for (let i = 0; i < areaPx; i++) insidePx += mask[i];
	const perHa = p.backgroundPerHa[season] * (pass === 'june' ? 0.6 : 1);
	const nBackground = Math.round((perHa * insidePx * WEED_PIXEL_M ** 2) / 1e4);
	for (let k = 0; k < nBackground; k++) {
		const i = Math.floor(rand() * areaPx);
		r.data[i] = 1;
		// Some come in twos and threes.
		if (rand() < 0.3 && i + 1 < areaPx) r.data[i + 1] = 1;
		if (rand() < 0.15 && i + r.cols < areaPx) r.data[i + r.cols] = 1;
	}
	for (let i = 0; i < areaPx; i++) r.data[i] &= mask[i];
	return r;
}

function paintEllipse(r: WeedRaster, e: Ellipse, density: number, rand: () => number): void {
	const c = Math.cos(e.rot);
	const s = Math.sin(e.rot);
	const ext = Math.max(e.a, e.b);
	const r0 = Math.max(0, Math.floor((e.y - ext - r.minN) / WEED_PIXEL_M));
	const r1 = Math.min(r.rows - 1, Math.ceil((e.y + ext - r.minN) / WEED_PIXEL_M));
	const q0 = Math.max(0, Math.floor((e.x - ext - r.minE) / WEED_PIXEL_M));
	const q1 = Math.min(r.cols - 1, Math.ceil((e.x + ext - r.minE) / WEED_PIXEL_M));
	for (let row = r0; row <= r1; row++) {
		const dy = r.minN + (row + 0.5) * WEED_PIXEL_M - e.y;
		for (let q = q0; q <= q1; q++) {
			const dx = r.minE + (q + 0.5) * WEED_PIXEL_M - e.x;
			const u = (dx * c + dy * s) / e.a;
			const v = (-dx * s + dy * c) / e.b;
			const d2 = u * u + v * v;
			// Thinner towards the patch edge.
			if (d2 < 1 && rand() < density * (1 - 0.7 * d2)) r.data[row * r.cols + q] = 1;
		}
	}
}
