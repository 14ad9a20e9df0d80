// Saves the map as a PNG with its key drawn underneath. WebGL clears its buffer after each frame
// (no preserveDrawingBuffer), so the map canvas is copied inside a 'render' callback, while the
// frame just drawn is still there.
import type { Map as MapLibreMap } from 'maplibre-gl';
import { changeStops, classes, classLabel, shareStops, statusKinds } from '$lib/map/ramps';
import type { ColourBy } from './cells';
import { paintHatch } from './hatch';

type Key = { title: string; subtitle: string; colourBy: ColourBy; thresholdPercent: number };

function copyFrame(map: MapLibreMap): Promise<HTMLCanvasElement> {
	return new Promise((resolve) => {
		map.once('render', () => {
			const source = map.getCanvas();
			const copy = document.createElement('canvas');
			copy.width = source.width;
			copy.height = source.height;
			copy.getContext('2d')!.drawImage(source, 0, 0);
			resolve(copy);
		});
		map.triggerRepaint();
	});
}

export async function mapPng(map: MapLibreMap, key: Key): Promise<Blob> {
	const frame = await copyFrame(map);
	const ratio = frame.width / map.getCanvas().clientWidth || 1;
	const keyHeight = Math.round(120 * ratio);
	const out = document.createElement('canvas');
	out.width = frame.width;
	out.height = frame.height + keyHeight;
	const ctx = out.getContext('2d')!;
	ctx.fillStyle = '#ffffff';
	ctx.fillRect(0, 0, out.width, out.height);
	ctx.drawImage(frame, 0, 0);
	ctx.scale(ratio, ratio);
	const top = frame.height / ratio;
	const font = (size: number, weight = 400) => `${weight} ${size}px "Noto Sans", sans-serif`;
	ctx.fillStyle = '#1d2527';
	ctx.font = font(14, 600);
	ctx.fillText(key.title, 12, top + 20);
	ctx.font = font(12);
	ctx.fillText(key.subtitle, 12, top + 38);

	let x = 12;
	const y = top + 52;
	const box = (fill: string | null, stroke?: string) => {
		if (fill) {
			ctx.fillStyle = fill;
			ctx.fillRect(x, y, 18, 12);
		}
		ctx.strokeStyle = stroke ?? 'rgba(0,0,0,0.2)';
		ctx.lineWidth = stroke ? 2 : 1;
		ctx.strokeRect(x, y, 18, 12);
	};
	const label = (text: string) => {
		ctx.fillStyle = '#1d2527';
		ctx.font = font(11);
		ctx.fillText(text, x + 22, y + 10);
		x += 22 + ctx.measureText(text).width + 12;
	};
	if (key.colourBy === 'share') {
		for (const c of classes(shareStops)) {
			box(c.colour);
			label(classLabel(c, '%'));
		}
	} else if (key.colourBy === 'change') {
		for (const c of classes(changeStops)) {
			box(c.colour);
			label(classLabel(c, 'pp', true));
		}
	}
	if (key.colourBy !== 'share') {
		x = key.colourBy === 'change' ? 12 : x;
		const row = key.colourBy === 'change' ? 20 : 0;
		ctx.translate(0, row);
		for (const k of statusKinds) {
			box(key.colourBy === 'status' ? k.colour : null, key.colourBy === 'change' ? k.colour : undefined);
			label(k.label);
		}
		ctx.translate(0, -row);
	}
	// The hatch swatch, then the attribution, on the last line.
	x = 12;
	ctx.translate(0, key.colourBy === 'change' ? 40 : 20);
	const hatch = document.createElement('canvas');
	hatch.width = hatch.height = 12;
	paintHatch(hatch.getContext('2d')!, 12, '#f7f5f0');
	ctx.drawImage(hatch, x, y, 18, 12);
	box(null);
	label('Under half the cell covered: not judged');
	if (key.colourBy === 'share') {
		box(shareStops[3][1], '#1d2527');
		label(`Hotspot: ${key.thresholdPercent} % or more`);
	}
	ctx.fillStyle = '#5e6a6d';
	ctx.font = font(10);
	const credit = 'Basemap: Natural Earth';
	ctx.fillText(credit, out.width / ratio - ctx.measureText(credit).width - 12, y + 10);
	ctx.setTransform(1, 0, 0, 1, 0, 0);
	return new Promise((resolve, reject) => out.toBlob((b) => (b ? resolve(b) : reject(new Error('The browser could not make the PNG.'))), 'image/png'));
}
