// The hatch that marks cells with too little coverage to judge: thin diagonal lines on a clear
// background, so such a cell never reads as "no weeds".
export const HATCH_COLOUR = '#6f7a7d';

/** Paints a diagonal hatch tile of `size` px on a 2D context (used for the map image and the PNG legend). */
export function paintHatch(ctx: CanvasRenderingContext2D, size: number, background: string | null = null) {
	if (background) {
		ctx.fillStyle = background;
		ctx.fillRect(0, 0, size, size);
	}
	ctx.strokeStyle = HATCH_COLOUR;
	ctx.lineWidth = Math.max(1, size / 8);
	ctx.beginPath();
	// Three strokes so the pattern tiles seamlessly.
	for (const offset of [-size, 0, size]) {
		ctx.moveTo(offset, size);
		ctx.lineTo(offset + size, 0);
	}
	ctx.stroke();
}

export function hatchImage(size = 16): ImageData {
	const canvas = document.createElement('canvas');
	canvas.width = canvas.height = size;
	const ctx = canvas.getContext('2d')!;
	paintHatch(ctx, size, 'rgba(247,245,240,0.6)');
	return ctx.getImageData(0, 0, size, size);
}

/** The same hatch as CSS, for the HTML legend. */
export const hatchCss = `repeating-linear-gradient(-45deg, ${HATCH_COLOUR} 0 1.5px, rgba(247,245,240,0.6) 1.5px 6px)`;
