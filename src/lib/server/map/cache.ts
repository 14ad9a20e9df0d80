// A bounded least-recently-used cache of encoded tiles. Bounded by entries and by bytes: an
// unbounded tile cache grew a bench server to 560 MB (mapstack.md, pitfall list).

export class LruCache<V> {
	private map = new Map<string, { value: V; bytes: number }>();
	private totalBytes = 0;

	constructor(
		private readonly maxEntries: number,
		private readonly maxBytes: number,
		private readonly sizeOf: (value: V) => number
	) {
		if (!(maxEntries > 0) || !(maxBytes > 0)) throw new Error('LruCache: limits must be positive');
	}

	get size() {
		return this.map.size;
	}

	get bytes() {
		return this.totalBytes;
	}

	get(key: string): V | undefined {
		const hit = this.map.get(key);
		if (!hit) return undefined;
		// Re-inserting moves the key to the end: Map keeps insertion order, so the first key is the oldest.
		this.map.delete(key);
		this.map.set(key, hit);
		return hit.value;
	}

	set(key: string, value: V): void {
		const bytes = this.sizeOf(value);
		const old = this.map.get(key);
		if (old) {
			this.totalBytes -= old.bytes;
			this.map.delete(key);
		}
		if (bytes > this.maxBytes) return;
		this.map.set(key, { value, bytes });
		this.totalBytes += bytes;
		while (this.map.size > this.maxEntries || this.totalBytes > this.maxBytes) {
			const oldest = this.map.keys().next().value as string;
			this.totalBytes -= this.map.get(oldest)!.bytes;
			this.map.delete(oldest);
		}
	}

	clear(): void {
		this.map.clear();
		this.totalBytes = 0;
	}
}
