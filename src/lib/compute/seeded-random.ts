/**
 * Mulberry32: a small, fast seeded PRNG, so invented logs (tests, the bench, the demo farm) come
 * out byte for byte the same on every run. Good enough for invented data, never for secrets.
 * @example const rand = seededRandom(42); rand(); // 0..1
 */
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
