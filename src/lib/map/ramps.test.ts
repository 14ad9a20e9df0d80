import { describe, expect, it } from 'vitest';
import { changeStops, classes, colourAt, interpolate, luminance, shareStops, statusKinds, type Stop } from './ramps';

const ascending = (stops: readonly Stop[]) => stops.every((s, i) => i === 0 || s[0] > stops[i - 1][0]);

describe('treated-share ramp', () => {
	it('has ascending stops from 0 % that stay inside 0-100 %', () => {
		expect(ascending(shareStops)).toBe(true);
		expect(shareStops[0][0]).toBe(0);
		expect(shareStops.at(-1)![0]).toBeLessThanOrEqual(100);
	});

	it('gets darker at every stop, so more weeds always read as darker', () => {
		// Relative luminance as WCAG 2.1 defines it (W3C, "relative luminance").
		const l = shareStops.map(([, c]) => luminance(c));
		for (let i = 1; i < l.length; i++) expect(l[i]).toBeLessThan(l[i - 1]);
	});

	it('has legend classes that meet end to end, the last open-ended', () => {
		const c = classes(shareStops);
		expect(c).toHaveLength(shareStops.length);
		for (let i = 0; i + 1 < c.length; i++) expect(c[i].to).toBe(c[i + 1].from);
		expect(c.at(-1)!.to).toBeNull();
	});

	it('gives the stop colours at the stops and clamps outside them', () => {
		expect(colourAt(shareStops, 0)).toEqual([0xf3, 0xea, 0xd0]);
		expect(colourAt(shareStops, 35)).toEqual([0x9c, 0x64, 0x28]);
		expect(colourAt(shareStops, -3)).toEqual([0xf3, 0xea, 0xd0]);
		expect(colourAt(shareStops, 100)).toEqual([0x46, 0x23, 0x0a]);
		// Halfway between 20 (#c48f3e) and 35 (#9c6428): the arithmetic mean per channel.
		expect(colourAt(shareStops, 27.5)).toEqual([Math.round((0xc4 + 0x9c) / 2), Math.round((0x8f + 0x64) / 2), Math.round((0x3e + 0x28) / 2)]);
	});

	it('builds a MapLibre interpolate expression with every stop in order', () => {
		const e = interpolate('share', shareStops);
		expect(e.slice(0, 3)).toEqual(['interpolate', ['linear'], ['to-number', ['get', 'share'], 0]]);
		expect(e.slice(3)).toEqual(shareStops.flat());
	});
});

describe('change ramp', () => {
	it('is diverging: ascending stops, lightest at no change, darker both ways', () => {
		expect(ascending(changeStops)).toBe(true);
		const zero = changeStops.findIndex(([v]) => v === 0);
		expect(zero).toBeGreaterThan(0);
		const l = changeStops.map(([, c]) => luminance(c));
		for (let i = 0; i < zero; i++) expect(l[i]).toBeLessThan(l[i + 1]);
		for (let i = zero; i + 1 < l.length; i++) expect(l[i + 1]).toBeLessThan(l[i]);
		expect(changeStops[0][0]).toBe(-changeStops.at(-1)![0]);
	});
});

describe('status colours', () => {
	it('are three distinct colours for codes 1-3', () => {
		expect(statusKinds.map((k) => k.code)).toEqual([1, 2, 3]);
		expect(new Set(statusKinds.map((k) => k.colour)).size).toBe(3);
	});

	it('rejects a colour that is not #rrggbb', () => {
		expect(() => luminance('red')).toThrow(/Not a #rrggbb colour: red/);
	});
});
