// Seeded randomness: every stream is named, so one log can be regenerated alone and come out
// byte for byte the same as in a full run.

/** mulberry32: small, fast, good enough for invented data (not for anything secret). */
export function seededRandom(seed: number): () => number {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

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
