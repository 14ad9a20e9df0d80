// The season summary as a PDF: one A4 page per field, written by pdfkit with Noto Sans embedded
// (the app's own font files from @fontsource/noto-sans; fontkit reads WOFF), the field's map as a
// PNG that sharp draws from the same SVG as the page. Nothing is fetched.
import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';
import PDFDocument from 'pdfkit';
import sharp from 'sharp';
import type { Actor } from '$lib/server/auth/guard';
import type { Field } from '$lib/server/db/schema';
import { classes, classLabel, shareStops } from '$lib/map/ramps';
import { colors } from '$lib/map/palette';
import { blockSideLabel, summaryCaution, summaryFigures, summaryLeases, summaryProducts } from '$lib/summaries/summary-text';
import { fieldMap, type FieldSeasonSummary } from './season-summary';

const require = createRequire(import.meta.url);
let fonts: Record<string, Buffer> | null = null;
function fontFiles() {
	// The latin and latin-ext subsets: together they hold every letter of European field names.
	fonts ??= Object.fromEntries(
		(['latin', 'latin-ext'] as const).flatMap((subset) =>
			([400, 700] as const).map((w) => [`${subset}-${w}`, readFileSync(require.resolve(`@fontsource/noto-sans/files/noto-sans-${subset}-${w}-normal.woff`))])
		)
	);
	return fonts;
}

// Code points of fontsource's latin subset (400.css unicode-range); the rest go to latin-ext.
const latinExtras = new Set([0x131, 0x152, 0x153, 0x2bb, 0x2bc, 0x2c6, 0x2da, 0x2dc, 0x304, 0x308, 0x329, 0x20ac, 0x2122, 0x2191, 0x2193, 0x2212, 0x2215, 0xfeff, 0xfffd]);
const inLatin = (cp: number) => cp <= 0xff || (cp >= 0x2000 && cp <= 0x206f) || latinExtras.has(cp);

/** Text split into runs of one subset each, so a name like “Øster Lykke” prints whole. */
function runs(text: string): { subset: 'latin' | 'latin-ext'; text: string }[] {
	const out: { subset: 'latin' | 'latin-ext'; text: string }[] = [];
	for (const ch of text) {
		const subset = inLatin(ch.codePointAt(0)!) ? 'latin' : 'latin-ext';
		if (out.length && out[out.length - 1].subset === subset) out[out.length - 1].text += ch;
		else out.push({ subset, text: ch });
	}
	return out;
}

type Doc = PDFKit.PDFDocument;
type TextOptions = PDFKit.Mixins.TextOptions;

function write(doc: Doc, text: string, opts: { x?: number; y?: number; size?: number; bold?: boolean; color?: string } & TextOptions = {}) {
	const { x, y, size = 10, bold = false, color = colors.ink, ...rest } = opts;
	const parts = runs(text);
	doc.fontSize(size).fillColor(color);
	parts.forEach((p, i) => {
		doc.font(`${p.subset}-${bold ? 700 : 400}`);
		const last = i === parts.length - 1;
		if (i === 0 && x !== undefined) doc.text(p.text, x, y, { ...rest, continued: !last });
		else doc.text(p.text, { ...rest, continued: !last });
	});
}

const A4 = { width: 595.28, height: 841.89 };
const MARGIN = 40;

async function fieldPage(doc: Doc, actor: Actor, field: Field, s: FieldSeasonSummary, currency: string) {
	const units = actor.user.units;
	const width = A4.width - 2 * MARGIN;
	write(doc, `Season summary ${s.season} · ${actor.farm.name}`, { x: MARGIN, y: MARGIN, size: 9, color: colors.loam500 });
	write(doc, s.field.name, { size: 20, bold: true, color: colors.loam700 });
	for (const l of summaryLeases(s, currency)) write(doc, `${l.name}: ${l.lease}. Landlord’s share of herbicide cost: ${l.share}.`, { size: 10 });
	doc.moveDown(0.5);

	// The map: drawn without text (the server's SVG renderer may have no fonts), labelled here.
	const map = await fieldMap(actor, field, s.season, { withText: false, maxWidthPx: 720, maxHeightPx: 440 });
	const png = await sharp(Buffer.from(map.svg), { density: 144 }).png().toBuffer();
	const k = Math.min(width / map.widthPx, 300 / map.heightPx);
	const imgX = MARGIN + (width - map.widthPx * k) / 2;
	const imgY = doc.y;
	doc.image(png, imgX, imgY, { width: map.widthPx * k, height: map.heightPx * k });
	write(doc, '0', { x: imgX + map.scale.x * k - 2, y: imgY + (map.scale.y - 16) * k, size: 7 });
	write(doc, map.scale.label, { x: imgX + (map.scale.x + map.scale.lengthPx) * k - 20, y: imgY + (map.scale.y - 16) * k, size: 7, width: 40, align: 'center' });
	write(doc, 'N', { x: imgX + (map.north.x - 22) * k, y: imgY + (map.north.y + 4) * k, size: 8, bold: true });
	doc.y = imgY + map.heightPx * k + 4;

	// Legend: the map's classes of treated share, and the hatch for thin coverage.
	let lx = MARGIN;
	const ly = doc.y;
	write(doc, 'Treated share:', { x: lx, y: ly, size: 7, color: colors.loam500 });
	lx += 52;
	for (const c of classes(shareStops)) {
		doc.rect(lx, ly, 10, 7).fillAndStroke(c.colour, colors.line);
		const label = classLabel(c, '%');
		write(doc, label, { x: lx + 12, y: ly, size: 7 });
		lx += 16 + doc.widthOfString(label);
	}
	doc.rect(lx, ly, 10, 7).fillAndStroke(colors.paper, colors.line);
	doc.moveTo(lx, ly + 7).lineTo(lx + 7, ly).lineWidth(0.8).stroke(colors.loam300).lineWidth(1);
	write(doc, 'less than half driven over', { x: lx + 12, y: ly, size: 7 });
	const blockSide = blockSideLabel(map.span * map.cellSizeM, units);
	write(doc, `North up. Each square is ${map.span > 1 ? `a block of ${map.span} × ${map.span} cells` : 'one cell'} (${blockSide} a side).`, { x: MARGIN, y: ly + 11, size: 7, color: colors.loam500 });
	doc.moveDown(0.8);

	// Figures, two columns of label and value.
	const figures = summaryFigures(s, units, currency);
	const colW = width / 2;
	const top = doc.y;
	figures.forEach((f, i) => {
		const x = MARGIN + (i % 2) * colW;
		const y = top + Math.floor(i / 2) * 38;
		write(doc, f.label, { x, y, size: 8, color: colors.loam500 });
		write(doc, f.value, { x, y: y + 10, size: 10.5, bold: true, width: colW - 8 });
		if (f.note) write(doc, f.note, { x, y: y + 23, size: 7.5, color: colors.loam500, width: colW - 8 });
	});
	doc.y = top + Math.ceil(figures.length / 2) * 38;

	// Products.
	const products = summaryProducts(s, units, currency);
	if (products.length) {
		const cols = [
			{ title: 'Product', w: 0.3 },
			{ title: 'Applied', w: 0.16 },
			{ title: 'Broadcast would use', w: 0.18 },
			{ title: 'Saved (estimate)', w: 0.22 },
			...(s.herbicideCost !== null ? [{ title: 'Cost', w: 0.14 }] : [])
		];
		let y = doc.y + 4;
		const row = (cells: string[], bold: boolean) => {
			let x = MARGIN;
			cells.forEach((c, i) => {
				write(doc, c, { x, y, size: 8.5, bold, width: cols[i].w * width - 4 });
				x += cols[i].w * width;
			});
			y += 14;
		};
		row(cols.map((c) => c.title), true);
		doc.moveTo(MARGIN, y - 3).lineTo(MARGIN + width, y - 3).lineWidth(0.5).stroke(colors.line);
		for (const p of products) row([p.name, p.applied, p.broadcast, p.saved, ...(p.cost !== null ? [p.cost] : [])], false);
		doc.y = y;
	} else {
		write(doc, `No applications were logged on ${s.field.name} in ${s.season}.`, { x: MARGIN, y: doc.y + 4, size: 10 });
	}
	if (s.unpriced.length) write(doc, `No catalogue price for ${s.unpriced.join(', ')}: left out of the cost.`, { x: MARGIN, size: 8, color: colors.loam500 });

	// Applications by day.
	if (s.applications.length) {
		doc.moveDown(0.6);
		write(doc, 'Applications', { x: MARGIN, size: 9, bold: true });
		for (const a of s.applications) write(doc, `${a.day} · ${a.tankMixName}`, { x: MARGIN, size: 8.5 });
	}

	// The caution, at the foot of every page.
	const caution = summaryCaution.join(' ');
	const cautionHeight = doc.font('latin-400').fontSize(7.5).heightOfString(caution, { width });
	write(doc, caution, { x: MARGIN, y: A4.height - MARGIN - cautionHeight - 4, size: 7.5, color: colors.loam500, width });
}

/** The PDF of these summaries, one page per field. `fields` holds each summary's field row. */
export async function summariesPdf(actor: Actor, summaries: { field: Field; summary: FieldSeasonSummary }[], currency: string): Promise<Buffer> {
	const doc = new PDFDocument({
		size: 'A4',
		margin: MARGIN,
		autoFirstPage: false,
		// Set by hand so two runs give the same bytes apart from the dates.
		info: { Title: `Season summaries, ${actor.farm.name}`, Creator: 'Patchbook', Producer: 'Patchbook (pdfkit)' },
		font: null as unknown as string
	});
	for (const [name, data] of Object.entries(fontFiles())) doc.registerFont(name, data);
	const chunks: Buffer[] = [];
	doc.on('data', (c: Buffer) => chunks.push(c));
	const done = new Promise<Buffer>((resolve, reject) => {
		doc.on('end', () => resolve(Buffer.concat(chunks)));
		doc.on('error', reject);
	});
	if (summaries.length === 0) {
		doc.addPage();
		write(doc, `No fields to summarise in ${actor.farm.name}.`, { x: MARGIN, y: MARGIN, size: 12 });
	}
	for (const { field, summary } of summaries) {
		doc.addPage();
		await fieldPage(doc, actor, field, summary, currency);
	}
	doc.end();
	return done;
}
