import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { fieldMapSvg, scaleBar } from './field-map-svg';
import { smallMultiple } from './small-multiple';

describe('scaleBar', () => {
	it('picks a round length no longer than asked, in the reader units', () => {
		expect(scaleBar(430, 'metric')).toEqual({ lengthM: 200, label: '200 m' });
		expect(scaleBar(999, 'metric')).toEqual({ lengthM: 500, label: '500 m' });
		expect(scaleBar(2600, 'metric')).toEqual({ lengthM: 2000, label: '2 km' });
		// 430 m = 1,410.8 ft (NIST SP 811: 1 ft = 0.3048 m): 1,000 ft = 304.8 m.
		expect(scaleBar(430, 'us').label).toBe('1000 ft');
		expect(scaleBar(430, 'us').lengthM).toBeCloseTo(304.8, 9);
		// 900 m = 0.559 mi: half a mile = 804.672 m.
		expect(scaleBar(900, 'us')).toEqual({ lengthM: 804.672, label: '0.5 mi' });
		// 3.5 km = 2.17 mi: 2 mi = 3,218.688 m.
		expect(scaleBar(3500, 'us').label).toBe('2 mi');
		expect(scaleBar(3500, 'us').lengthM).toBeCloseTo(3218.688, 9);
	});
});

describe('fieldMapSvg', () => {
	// A 4 x 2 grid of 10 m cells: one cell sprayed on 40 % of its covered area, one thinly covered.
	const grid = { cols: 4, rows: 2, originX: 0, originY: 0, cellSizeM: 10 };
	const ring = Float64Array.from([0, 0, 40, 0, 40, 20, 0, 20, 0, 0]);
	const m = smallMultiple(
		[
			{ col: 0, row: 0, coveredM2: 100, sprayedM2: 40, cover: 1 },
			{ col: 3, row: 1, coveredM2: 20, sprayedM2: 20, cover: 0.2 }
		],
		grid,
		1,
		[ring]
	);

	it('fits the map to the box, keeps its shape and scales the bar by the map', () => {
		const out = fieldMapSvg(m, { blockM: 10, units: 'metric', maxWidthPx: 412, maxHeightPx: 400 });
		// 4 blocks across in 400 px: 100 px a block, 10 px a metre.
		expect(out.map.width).toBeCloseTo(400, 9);
		expect(out.map.height).toBeCloseTo(200, 9);
		expect(out.map.pxPerM).toBeCloseTo(10, 9);
		// At most 40 % of the image's width (about 16.5 m): 10 m, 100 px.
		expect(out.scale).toMatchObject({ lengthM: 10, label: '10 m' });
		expect(out.scale.lengthPx).toBeCloseTo(100, 9);
		expect(out.svg).toContain('>10 m</text>');
		expect(out.svg).toContain(m.fills[0].colour);
		expect(out.svg).toContain('url(#pb-hatch)');
	});

	it('leaves the text out when asked, and draws into a PNG whose pixels show the cells', async () => {
		const out = fieldMapSvg(m, { blockM: 10, units: 'us', maxWidthPx: 412, maxHeightPx: 400, withText: false, title: 'A & B' });
		expect(out.svg).not.toContain('<text');
		expect(out.svg).toContain('A &amp; B');
		const { data, info } = await sharp(Buffer.from(out.svg)).png().toBuffer({ resolveWithObject: true }).then(async (r) => ({
			...r,
			data: (await sharp(r.data).raw().toBuffer({ resolveWithObject: true })).data
		}));
		expect(info.width).toBe(out.widthPx);
		expect(info.height).toBe(out.heightPx);
		// The middle of the sprayed cell (lower left, block 0,1 from the top) has its ramp colour.
		const px = (x: number, y: number) => {
			const i = (Math.round(y) * info.width + Math.round(x)) * info.channels;
			return `#${[data[i], data[i + 1], data[i + 2]].map((c) => c.toString(16).padStart(2, '0')).join('')}`;
		};
		expect(px(out.map.x + 50, out.map.y + 150)).toBe(m.fills[0].colour);
		// A cell never driven over is the paper colour.
		expect(px(out.map.x + 150, out.map.y + 150)).toBe('#f7f5f0');
	});
});
