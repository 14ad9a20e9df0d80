// Colour ramps of the map, defined once: the paint expressions, the HTML legend and the PNG
// export's legend are all built from these arrays so they cannot drift apart. Our own colours
// (see /tmp/map-contract.md): light straw to dark bark for treated share, blue to brick for change.

/** [value, '#rrggbb'] pairs, values ascending. */
export type Stop = readonly [number, string];

/** Treated share of a cell, percent of its covered area that was sprayed. */
export const shareStops: readonly Stop[] = [
	[0, '#f3ead0'],
	[5, '#e9d59a'],
	[10, '#dcb866'],
	[20, '#c48f3e'],
	[35, '#9c6428'],
	[50, '#6e3f17'],
	[75, '#46230a']
];

/** Change of treated share between two seasons, percentage points (later minus earlier). */
export const changeStops: readonly Stop[] = [
	[-50, '#2d6f8e'],
	[-20, '#8fb3c4'],
	[0, '#f4f1ea'],
	[20, '#cf8f6a'],
	[50, '#9a3412']
];

/** Hotspot status codes in compare tiles: 1 persistent, 2 new, 3 cleared (0: neither season hot). */
export const statusKinds = [
	{ code: 1, key: 'persistent', label: 'Persistent', colour: '#6b1f0a' },
	{ code: 2, key: 'new', label: 'New', colour: '#d97706' },
	{ code: 3, key: 'cleared', label: 'Cleared', colour: '#3b82a0' }
] as const;

/** Cells with less of their area covered than this are hatched, not coloured. */
export const MIN_COVER = 0.5;

export type RampClass = { from: number; to: number | null; colour: string };

/** The legend's classes: one per stop, from that stop to the next (the last is open-ended). */
export function classes(stops: readonly Stop[]): RampClass[] {
	return stops.map(([from, colour], i) => ({ from, to: i + 1 < stops.length ? stops[i + 1][0] : null, colour }));
}

/** A MapLibre `interpolate` expression over a numeric feature property. */
export function interpolate(property: string, stops: readonly Stop[]): unknown[] {
	return ['interpolate', ['linear'], ['to-number', ['get', property], 0], ...stops.flat()];
}

function rgb(hex: string): [number, number, number] {
	const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
	if (!m) throw new Error(`Not a #rrggbb colour: ${hex}`);
	return [parseInt(m[1], 16), parseInt(m[2], 16), parseInt(m[3], 16)];
}

/** The colour the map draws at `value`: linear in sRGB between stops, clamped at the ends (as MapLibre's `interpolate` does for colours). */
export function colourAt(stops: readonly Stop[], value: number): [number, number, number] {
	if (value <= stops[0][0]) return rgb(stops[0][1]);
	for (let i = 1; i < stops.length; i++) {
		const [v1, c1] = stops[i];
		if (value <= v1) {
			const [v0, c0] = stops[i - 1];
			const t = (value - v0) / (v1 - v0);
			const a = rgb(c0), b = rgb(c1);
			return [0, 1, 2].map((k) => Math.round(a[k] + (b[k] - a[k]) * t)) as [number, number, number];
		}
	}
	return rgb(stops[stops.length - 1][1]);
}

/** WCAG 2.x relative luminance of a #rrggbb colour, 0 (black) to 1 (white). */
export function luminance(hex: string): number {
	const [r, g, b] = rgb(hex).map((c) => {
		const s = c / 255;
		return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
	});
	return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** Number format for legend labels: "35 %", "+20 pp". */
export function classLabel(c: RampClass, unit: string, signed = false): string {
	const n = (v: number) => (signed && v > 0 ? `+${v}` : `${v}`);
	return c.to === null ? `${n(c.from)} ${unit} and more` : `${n(c.from)} to ${n(c.to)} ${unit}`;
}
