// One field's season as a standalone SVG document: the field page's small multiple (cells coloured
// by treated share, thin coverage hatched, the boundary) drawn larger, with a north arrow and a
// scale bar under it. Static, so it prints and goes into the PDF as it is (sharp turns it into a
// PNG there). Text is optional: the PDF writes its own labels in the embedded font, since the
// SVG renderer on the server may have no fonts at all.
import { fromSi, toSi } from '$lib/compute/units';
import { colors } from './palette';
import type { SmallMultiple } from './small-multiple';

export type ScaleBar = { lengthM: number; label: string };

const niceSteps = [1, 2, 5];

/** The largest 1, 2 or 5 × 10^n not above `value` (value > 0). */
function niceBelow(value: number): number {
	const exp = Math.floor(Math.log10(value));
	let best = 10 ** exp;
	for (const s of niceSteps) if (s * 10 ** exp <= value) best = s * 10 ** exp;
	return best;
}

/**
 * A round scale-bar length at most `maxM` metres, in the reader's units: metres below a
 * kilometre, then kilometres; feet below half a mile, then miles.
 */
export function scaleBar(maxM: number, units: 'metric' | 'us'): ScaleBar {
	if (!(maxM > 0)) throw new Error(`scaleBar: maxM must be positive, got ${maxM}`);
	if (units === 'metric') {
		if (maxM >= 1000) {
			const km = niceBelow(maxM / 1000);
			return { lengthM: km * 1000, label: `${km} km` };
		}
		const m = niceBelow(maxM);
		return { lengthM: m, label: `${m} m` };
	}
	const mi = fromSi('length', maxM, 'mi');
	if (mi >= 0.5) {
		const n = mi >= 1 ? niceBelow(mi) : 0.5;
		return { lengthM: toSi('length', n, 'mi'), label: `${n} mi` };
	}
	const ft = niceBelow(fromSi('length', maxM, 'ft'));
	return { lengthM: toSi('length', ft, 'ft'), label: `${ft} ft` };
}

export type FieldMapSvg = {
	svg: string;
	widthPx: number;
	heightPx: number;
	/** Where the map sits in the image, in pixels, and how many pixels one metre is. */
	map: { x: number; y: number; width: number; height: number; pxPerM: number };
	/** The scale bar as drawn: its left end, its length in pixels, what it stands for. */
	scale: ScaleBar & { x: number; y: number; lengthPx: number };
	/** The north arrow's tip. */
	north: { x: number; y: number };
};

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/**
 * The SVG of one small multiple at up to `maxWidthPx` × `maxHeightPx` for the map itself, plus a
 * band of `bandPx` underneath for the north arrow and the scale bar. `blockM` is the side of one
 * block in metres (cell size × span).
 */
export function fieldMapSvg(
	m: SmallMultiple,
	{
		blockM,
		units,
		maxWidthPx = 720,
		maxHeightPx = 560,
		bandPx = 40,
		withText = true,
		title
	}: { blockM: number; units: 'metric' | 'us'; maxWidthPx?: number; maxHeightPx?: number; bandPx?: number; withText?: boolean; title?: string }
): FieldMapSvg {
	const pad = 6;
	const s = Math.min((maxWidthPx - 2 * pad) / m.width, (maxHeightPx - 2 * pad) / m.height);
	const mapW = m.width * s;
	const mapH = m.height * s;
	const widthPx = Math.ceil(Math.max(mapW + 2 * pad, 240));
	const heightPx = Math.ceil(mapH + 2 * pad + bandPx);
	const x0 = (widthPx - mapW) / 2;
	const y0 = pad;
	const pxPerM = s / blockM;
	const bar = scaleBar((widthPx * 0.4) / pxPerM, units);
	const barPx = bar.lengthM * pxPerM;
	const barX = pad + 4;
	const barY = heightPx - bandPx / 2;
	const northX = widthPx - pad - 14;
	const northY = heightPx - bandPx + 6;
	const stroke = 1.25 / s;
	const r = (v: number) => Math.round(v * 100) / 100;
	const half = r(barPx / 2);
	const text = (x: number, y: number, t: string, anchor = 'start') =>
		`<text x="${r(x)}" y="${r(y)}" font-family="Noto Sans, sans-serif" font-size="11" fill="${colors.ink}" text-anchor="${anchor}">${esc(t)}</text>`;
	const svg = [
		`<svg xmlns="http://www.w3.org/2000/svg" width="${widthPx}" height="${heightPx}" viewBox="0 0 ${widthPx} ${heightPx}"${title ? ` role="img" aria-label="${esc(title)}"` : ''}>`,
		title ? `<title>${esc(title)}</title>` : '',
		`<rect width="${widthPx}" height="${heightPx}" fill="#ffffff"/>`,
		'<defs>',
		// One hatch stroke per block, at 45 degrees, as the map draws thinly covered cells.
		`<pattern id="pb-hatch" width="1" height="1" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">`,
		`<rect width="1" height="1" fill="${colors.paper}"/><line x1="0" y1="0" x2="0" y2="1" stroke="${colors.loam300}" stroke-width="0.35"/></pattern>`,
		'</defs>',
		`<g transform="translate(${r(x0)} ${r(y0)}) scale(${r(s * 1000) / 1000})">`,
		`<path d="${m.outline}" fill="${colors.paper}" fill-rule="evenodd"/>`,
		...m.fills.map((f) => `<path d="${f.d}" fill="${f.colour}" shape-rendering="crispEdges"/>`),
		m.hatch ? `<path d="${m.hatch}" fill="url(#pb-hatch)"/>` : '',
		`<path d="${m.outline}" fill="none" stroke="${colors.loam700}" stroke-width="${r(stroke * 1000) / 1000}" fill-rule="evenodd" stroke-linejoin="round"/>`,
		'</g>',
		// Scale bar: two halves, dark and light, with end ticks.
		`<g stroke="${colors.ink}" stroke-width="1">`,
		`<rect x="${barX}" y="${barY - 3}" width="${half}" height="6" fill="${colors.ink}"/>`,
		`<rect x="${r(barX + half)}" y="${barY - 3}" width="${half}" height="6" fill="#ffffff"/>`,
		'</g>',
		withText ? text(barX, barY - 7, '0') + text(barX + barPx, barY - 7, bar.label, 'middle') : '',
		// North arrow: a dark half and a light half of one arrowhead, tip up.
		`<path d="M${northX} ${northY}l-7 20l7 -5z" fill="${colors.ink}"/>`,
		`<path d="M${northX} ${northY}l7 20l-7 -5z" fill="#ffffff" stroke="${colors.ink}" stroke-width="1"/>`,
		withText ? text(northX - 16, northY + 14, 'N', 'middle') : '',
		'</svg>'
	].join('');
	return {
		svg,
		widthPx,
		heightPx,
		map: { x: x0, y: y0, width: mapW, height: mapH, pxPerM },
		scale: { ...bar, x: barX, y: barY, lengthPx: barPx },
		north: { x: northX, y: northY }
	};
}
