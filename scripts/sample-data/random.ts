// Seeded randomness: every stream is named, so one log can be regenerated alone and come out
// byte for byte the same as in a full run.

import { seededRandom } from '../../src/lib/compute/seeded-random';

export { seededRandom };

/** FNV-1a of a name: a stable seed per stream ("weeds/Long Hill/2025"). */
export function seedOf(name: string): number {
	let h = 0x811c9dc5;
	for (let i = 0; i < name.length; i++) {
		h ^= name.charCodeAt(i);
		h = Math.imul(h, 0x01000193);
	}
	return h >>> 0;
}

export function randomFor(name: string): () => number {
	return seededRandom(seedOf(name));
}

/** Standard normal from two uniforms (Box-Muller). */
export function gaussian(rand: () => number): number {
	const u = 1 - rand();
	const v = rand();
	return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

export function between(rand: () => number, lo: number, hi: number): number {
	return lo + (hi - lo) * rand();
}
