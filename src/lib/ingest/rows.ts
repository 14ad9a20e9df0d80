// Turns mapped rows (CSV records or feature attributes) into FixColumns, straight into growing
// typed arrays, checking every cell. Shared by the CSV, GeoJSON and shapefile readers.
import type { FixColumns } from '../compute/types';
import { makeToWgs84, type ToWgs84 } from './crs';
import type { IngestIssue } from './issues';
import { ISO_RE, mappedColumns, type ColumnMapping } from './mapping';
import { flowToLPerS, lengthToM, pressureToPa, rateToLPerM2, speedToMPerS } from './units';

/** Columns the engine's FixColumns has no slot for, kept for later use (display, checks). */
export type FixExtras = {
	headingDeg?: Float32Array;
};

/** Optional columns that travel with the fixes (cleaned, split, packed, checked for quality). */
const FIX_COLUMNS = new Set(['rateLPerM2', 'flowLPerS', 'speedMPerS', 'pressurePa', 'boomHeightM']);

export type ReadLogResult = {
	/** Null when any row was fatally wrong: an import succeeds whole or not at all. */
	fixes: FixColumns | null;
	extras: FixExtras;
	warnings: IngestIssue[];
	errors: IngestIssue[];
};

export type ReadLogOptions = {
	/** The machine's nozzle count; nozzle strings of another length are errors. */
	nozzleCount?: number;
	/** Stop listing errors after this many (the count of the rest is reported). */
	maxErrors?: number;
};

/** A cell as a reader has it: CSV text, or a feature attribute value. */
export type Cell = string | number | boolean | null | undefined;

const MISSING = Symbol('missing');
const SECONDS_RE = /^[0-5]\d(?:\.\d{1,9})?$/;
type Num = number | typeof MISSING;

class Growing<T extends Float64Array | Float32Array | Uint32Array | Uint8Array> {
	data: T;
	constructor(
		private readonly make: (n: number) => T,
		private readonly width = 1
	) {
		this.data = make(4096 * width);
	}
	ensure(count: number) {
		if (count * this.width <= this.data.length) return;
		const next = this.make(Math.max(count * this.width, this.data.length * 2));
		next.set(this.data as never);
		this.data = next;
	}
	final(count: number): T {
		return this.data.slice(0, count * this.width) as T;
	}
}

type Indexed = { index: number; name: string };

/** Checks the mapping against the columns and builds the per-row converter. Returns issues
 * instead when required parts are missing. */
export function planRows(
	file: string,
	columns: string[],
	mapping: ColumnMapping,
	opts: ReadLogOptions
): { plan: RowPlan } | { errors: IngestIssue[] } {
	const errors: IngestIssue[] = [];
	const issue = (message: string, column: string | null = null) => errors.push({ file, row: null, column, message });
	if (!mapping.time) issue('no column is mapped to time; time is required');
	if (!mapping.position) issue('no columns are mapped to the position (latitude and longitude, or x/y); position is required');
	if (!mapping.spray) issue('no column is mapped to the nozzle states, active width or sprayed fraction; one of them is required');
	const indexOf = new Map<string, number>();
	columns.forEach((c, i) => {
		if (!indexOf.has(c)) indexOf.set(c, i);
	});
	for (const { role, column } of mappedColumns(mapping)) {
		if (!indexOf.has(column)) issue(`required column '${column}' (${role}) is missing from the file`, column);
	}
	let toWgs84: ToWgs84 | null = null;
	const pos = mapping.position;
	if (pos && pos.kind !== 'lngLat' && pos.crs != null) {
		try {
			toWgs84 = makeToWgs84(pos.crs);
		} catch (err) {
			issue(err instanceof Error ? err.message : String(err));
		}
	}
	if (pos?.kind === 'xy' && pos.crs == null)
		issue(`x/y columns '${pos.x}' and '${pos.y}' need a coordinate system: choose an EPSG code`);
	if (mapping.spray?.kind === 'nozzles' && !(opts.nozzleCount && opts.nozzleCount > 0))
		issue("the machine's nozzle count is needed to read nozzle states");
	if (errors.length) return { errors };
	const at = (column: string): Indexed => ({ index: indexOf.get(column)!, name: column });
	return { plan: new RowPlan(file, mapping, at, toWgs84, opts) };
}

/** Converts rows one by one into typed arrays, collecting row/column errors. */
export class RowPlan {
	count = 0;
	readonly errors: IngestIssue[] = [];
	readonly warnings: IngestIssue[] = [];
	private suppressed = 0;
	private readonly maxErrors: number;
	private readonly nozzleCount: number;
	private readonly nozzleWords: number;

	private readonly timeS = new Growing((n) => new Float64Array(n));
	private readonly lng = new Growing((n) => new Float64Array(n));
	private readonly lat = new Growing((n) => new Float64Array(n));
	private readonly sourceRow = new Growing((n) => new Uint32Array(n));
	private readonly bits: Growing<Uint32Array> | null = null;
	private readonly sprayValue: Growing<Float32Array> | null = null;
	private readonly optional: { key: string; col: Indexed; factor: number; out: Growing<Float32Array> }[] = [];
	private readonly master: Growing<Uint8Array> | null = null;

	private readonly timeCol: Indexed | null = null;
	private readonly dateCol: Indexed | null = null;
	private readonly clockCol: Indexed | null = null;
	private readonly xCol: Indexed | null = null;
	private readonly yCol: Indexed | null = null;
	private readonly nozzleCols: Indexed[] = [];
	private readonly sprayCol: Indexed | null = null;
	private readonly masterCol: Indexed | null = null;
	private readonly sprayScale: number = 1;
	private naiveTimes = 0;
	private swappedRows = 0;
	private projectedRows = 0;
	private positionRows = 0;

	constructor(
		readonly file: string,
		readonly mapping: ColumnMapping,
		at: (column: string) => Indexed,
		private readonly toWgs84: ToWgs84 | null,
		opts: ReadLogOptions
	) {
		this.maxErrors = opts.maxErrors ?? 50;
		const t = mapping.time!;
		if (t.kind === 'dateAndTime') {
			this.dateCol = at(t.dateColumn);
			this.clockCol = at(t.timeColumn);
		} else this.timeCol = at(t.column);
		const p = mapping.position!;
		if (p.kind === 'lngLat') {
			this.xCol = at(p.lng);
			this.yCol = at(p.lat);
		} else if (p.kind === 'xy') {
			this.xCol = at(p.x);
			this.yCol = at(p.y);
		}
		const s = mapping.spray!;
		this.nozzleCount = s.kind === 'nozzles' ? opts.nozzleCount! : 0;
		this.nozzleWords = Math.ceil(this.nozzleCount / 32);
		if (s.kind === 'nozzles') {
			this.nozzleCols = s.columns.map(at);
			this.bits = new Growing((n) => new Uint32Array(n), this.nozzleWords);
		} else {
			this.sprayCol = at(s.column);
			this.sprayValue = new Growing((n) => new Float32Array(n));
			this.sprayScale = s.kind === 'activeWidth' ? lengthToM[s.unit] : s.scale === 'percent' ? 0.01 : 1;
		}
		if (mapping.master) {
			this.masterCol = at(mapping.master.column);
			this.master = new Growing((n) => new Uint8Array(n));
		}
		const add = (key: string, column: string, factor: number) =>
			this.optional.push({ key, col: at(column), factor, out: new Growing((n) => new Float32Array(n)) });
		if (mapping.rate) add('rateLPerM2', mapping.rate.column, rateToLPerM2[mapping.rate.unit]);
		if (mapping.flow) add('flowLPerS', mapping.flow.column, flowToLPerS[mapping.flow.unit]);
		if (mapping.speed) add('speedMPerS', mapping.speed.column, speedToMPerS[mapping.speed.unit]);
		if (mapping.heading) add('headingDeg', mapping.heading.column, 1);
		if (mapping.pressure) add('pressurePa', mapping.pressure.column, pressureToPa[mapping.pressure.unit]);
		if (mapping.boomHeight) add('boomHeightM', mapping.boomHeight.column, lengthToM[mapping.boomHeight.unit]);
	}

	private quiet = false;

	/** Records a problem with a row found by the reader itself (e.g. a wrong number of fields). */
	fail(row: number, column: string | null, message: string): false {
		if (this.quiet) return false;
		if (this.errors.length < this.maxErrors) this.errors.push({ file: this.file, row, column, message });
		else this.suppressed++;
		return false;
	}

	private num(cell: Cell): Num | null {
		if (cell === null || cell === undefined) return MISSING;
		if (typeof cell === 'number') return Number.isFinite(cell) ? cell : MISSING;
		if (typeof cell === 'boolean') return null;
		const s = this.mapping.decimalComma ? cell.trim().replace(',', '.') : cell.trim();
		if (s === '') return MISSING;
		const v = Number(s);
		return Number.isFinite(v) ? v : null;
	}

	/** Stores a row; returns false (recording why, unless quiet) when it is bad. */
	addRow(cells: ArrayLike<Cell>, row: number, point?: [number, number] | null, quiet = false): boolean {
		this.quiet = quiet;
		try {
			return this.convert(cells, row, point);
		} finally {
			this.quiet = false;
		}
	}

	private convert(cells: ArrayLike<Cell>, row: number, point?: [number, number] | null): boolean {
		const n = this.count;
		let ok = true;

		// Time
		let timeS = NaN;
		if (this.timeCol) {
			const cell = cells[this.timeCol.index];
			const t = this.mapping.time!;
			if (t.kind === 'epoch') {
				const v = this.num(cell);
				if (v === MISSING || v === null) ok = this.fail(row, this.timeCol.name, v === MISSING ? 'time is empty' : `time '${cell}' is not a number of ${t.unit === 'ms' ? 'milliseconds' : 'seconds'} since 1970`);
				else timeS = t.unit === 'ms' ? v / 1000 : v;
			} else {
				timeS = this.parseIso(cell == null ? '' : String(cell).trim());
				if (Number.isNaN(timeS)) ok = this.fail(row, this.timeCol.name, `time '${cell ?? ''}' is not an ISO 8601 date and time`);
			}
		} else {
			const d = String(cells[this.dateCol!.index] ?? '').trim();
			const c = String(cells[this.clockCol!.index] ?? '').trim();
			timeS = this.parseDateAndClock(d, c);
			if (Number.isNaN(timeS)) ok = this.fail(row, `${this.dateCol!.name}' + '${this.clockCol!.name}`, `date '${d}' and time '${c}' could not be read as a date and time`);
		}

		// Position
		let x = NaN;
		let y = NaN;
		if (this.xCol && this.yCol) {
			const vx = this.num(cells[this.xCol.index]);
			const vy = this.num(cells[this.yCol.index]);
			if (typeof vx !== 'number') ok = this.fail(row, this.xCol.name, vx === MISSING ? 'position is empty' : `'${cells[this.xCol.index]}' is not a number`);
			else x = vx;
			if (typeof vy !== 'number') ok = this.fail(row, this.yCol.name, vy === MISSING ? 'position is empty' : `'${cells[this.yCol.index]}' is not a number`);
			else y = vy;
		} else if (point) {
			[x, y] = point;
		} else ok = this.fail(row, null, 'the feature has no point geometry');
		let lng = x;
		let lat = y;
		if (Number.isFinite(x) && Number.isFinite(y)) {
			this.positionRows++;
			if (this.toWgs84) {
				[lng, lat] = this.toWgs84([x, y]);
				if (!Number.isFinite(lng) || !Number.isFinite(lat) || Math.abs(lat) > 90)
					ok = this.fail(row, this.xCol?.name ?? null, `x/y ${x}, ${y} do not fall on the earth in the chosen coordinate system`);
			} else if (Math.abs(lat) > 90 || Math.abs(lng) > 180) {
				const latName = this.yCol?.name ?? null;
				if (Math.abs(lat) > 90 && Math.abs(lat) <= 180 && Math.abs(lng) <= 90) {
					this.swappedRows++;
					ok = this.fail(row, latName, `latitude ${lat} is beyond 90 degrees while longitude ${lng} is not: latitude and longitude look swapped`);
				} else {
					this.projectedRows++;
					ok = this.fail(row, latName, `${lng}, ${lat} are not degrees (latitude within 90, longitude within 180): they look like projected coordinates; map them as x/y and choose an EPSG code`);
				}
			}
		}

		// Spray state
		if (this.bits) {
			let text = '';
			for (const col of this.nozzleCols) {
				const cell = cells[col.index];
				if (typeof cell === 'number') {
					ok = this.fail(row, col.name, 'nozzle states are stored as a number, which loses leading zeros; they must be text of 0 and 1');
				} else text += cell == null ? '' : String(cell).trim();
			}
			const columnName = this.nozzleCols.map((c) => c.name).join(' + ');
			if (text.length !== this.nozzleCount) {
				ok = this.fail(row, columnName, `nozzle states have ${text.length} characters; the machine has ${this.nozzleCount} nozzles`);
			} else if (ok) {
				this.bits.ensure(n + 1);
				const words = this.bits.data;
				const base = n * this.nozzleWords;
				words.fill(0, base, base + this.nozzleWords);
				for (let k = 0; k < text.length; k++) {
					const c = text.charCodeAt(k);
					if (c === 49) words[base + (k >> 5)] |= 1 << (k & 31);
					else if (c !== 48) {
						ok = this.fail(row, columnName, `nozzle state ${k + 1} is '${text[k]}'; only 0 and 1 are allowed`);
						break;
					}
				}
			}
		} else {
			const col = this.sprayCol!;
			const v = this.num(cells[col.index]);
			if (typeof v !== 'number') ok = this.fail(row, col.name, v === MISSING ? 'spray value is empty' : `'${cells[col.index]}' is not a number`);
			else {
				const scaled = v * this.sprayScale;
				if (this.mapping.spray!.kind === 'fraction' && (scaled < 0 || scaled > 1 + 1e-9))
					ok = this.fail(row, col.name, `sprayed fraction ${v} is outside ${this.sprayScale === 1 ? '0..1' : '0..100 %'}`);
				else if (scaled < 0) ok = this.fail(row, col.name, `active width ${v} is negative`);
				else if (ok) {
					this.sprayValue!.ensure(n + 1);
					this.sprayValue!.data[n] = Math.min(scaled, this.mapping.spray!.kind === 'fraction' ? 1 : Infinity);
				}
			}
		}

		let masterOn = 1;
		if (this.masterCol) {
			const cell = cells[this.masterCol.index];
			const m = readSwitch(cell);
			// An empty master cell is taken as on: the nozzle states still say what sprayed.
			if (m === null) ok = this.fail(row, this.masterCol.name, `master switch '${cell}' is not 1/0, on/off or true/false`);
			else masterOn = m;
		}

		const values: number[] = [];
		for (const o of this.optional) {
			const v = this.num(cells[o.col.index]);
			if (v === null) ok = this.fail(row, o.col.name, `'${cells[o.col.index]}' is not a number`);
			else values.push(v === MISSING ? NaN : v * o.factor);
		}

		if (!ok) return false;
		this.timeS.ensure(n + 1);
		this.lng.ensure(n + 1);
		this.lat.ensure(n + 1);
		this.sourceRow.ensure(n + 1);
		this.timeS.data[n] = timeS;
		this.lng.data[n] = lng;
		this.lat.data[n] = lat;
		this.sourceRow.data[n] = row;
		if (this.master) {
			this.master.ensure(n + 1);
			this.master.data[n] = masterOn;
		}
		this.optional.forEach((o, i) => {
			o.out.ensure(n + 1);
			o.out.data[n] = values[i];
		});
		this.count = n + 1;
		return true;
	}

	// Consecutive fixes share their minute: 'YYYY-MM-DDTHH:MM' is parsed once, then only the
	// seconds of 'ss(.fff)Z' are read. Saves most of the reader's time on a 5 Hz log.
	private minutePrefix = '';
	private minuteStartS = 0;

	private parseIso(s: string): number {
		if (this.minutePrefix && s.length >= 20 && s.startsWith(this.minutePrefix) && s.charCodeAt(s.length - 1) === 90) {
			const seconds = s.slice(17, -1);
			if (SECONDS_RE.test(seconds)) return this.minuteStartS + Number(seconds);
		}
		const t = this.parseIsoFully(s);
		if (!Number.isNaN(t) && s.length >= 20 && s.charCodeAt(16) === 58 && s.charCodeAt(s.length - 1) === 90 && SECONDS_RE.test(s.slice(17, -1))) {
			this.minutePrefix = s.slice(0, 16);
			this.minuteStartS = t - Number(s.slice(17, -1));
		}
		return t;
	}

	private parseIsoFully(s: string): number {
		const m = ISO_RE.exec(s);
		if (!m) return NaN;
		const [, Y, Mo, D, h = '0', mi = '0', sec = '0', frac, zone] = m;
		const ms = Date.UTC(+Y, +Mo - 1, +D, +h, +mi, +sec);
		if (!validParts(+Y, +Mo, +D, +h, +mi, +sec)) return NaN;
		let t = ms / 1000 + (frac ? Number(`0.${frac}`) : 0);
		if (!zone) {
			this.naiveTimes++;
			t -= (this.mapping.time?.utcOffsetMin ?? 0) * 60;
		} else if (zone.toUpperCase() !== 'Z') {
			const sign = zone[0] === '-' ? -1 : 1;
			const digits = zone.slice(1).replace(':', '');
			t -= sign * (Number(digits.slice(0, 2)) * 3600 + Number(digits.slice(2) || '0') * 60);
		}
		return t;
	}

	private parseDateAndClock(d: string, c: string): number {
		const t = this.mapping.time;
		if (t?.kind !== 'dateAndTime') return NaN;
		let Y: number, Mo: number, D: number;
		const parts = d.split(/[-/.]/).map(Number);
		if (parts.length !== 3 || parts.some((p) => !Number.isInteger(p))) return NaN;
		if (t.dateOrder === 'ymd') [Y, Mo, D] = parts;
		else if (t.dateOrder === 'dmy') [D, Mo, Y] = parts;
		else [Mo, D, Y] = parts;
		if (Y < 100) Y += 2000;
		const cm = /^(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d+))?)?$/.exec(c);
		if (!cm) return NaN;
		const h = +cm[1], mi = +cm[2], sec = cm[3] ? +cm[3] : 0;
		if (!validParts(Y, Mo, D, h, mi, sec)) return NaN;
		this.naiveTimes++;
		return Date.UTC(Y, Mo - 1, D, h, mi, sec) / 1000 + (cm[4] ? Number(`0.${cm[4]}`) : 0) - (t.utcOffsetMin ?? 0) * 60;
	}

	/** Completes the read: whole-file checks, then the columns (or null when anything failed). */
	finish(): ReadLogResult {
		const errors = [...this.errors];
		const file = this.file;
		if (this.positionRows > 0 && this.swappedRows === this.positionRows) {
			// Every row looks swapped: one clear message beats fifty row messages.
			const first = errors.find((e) => e.message.includes('swapped'));
			errors.splice(0, errors.length, ...errors.filter((e) => !e.message.includes('swapped')));
			errors.unshift({ file, row: first?.row ?? null, column: first?.column ?? null, message: `latitude and longitude look swapped for the whole file (latitude beyond 90 degrees on all ${this.swappedRows} rows): map the columns the other way round` });
		} else if (this.positionRows > 0 && this.projectedRows === this.positionRows) {
			const first = errors.find((e) => e.message.includes('projected'));
			errors.splice(0, errors.length, ...errors.filter((e) => !e.message.includes('projected')));
			errors.unshift({ file, row: first?.row ?? null, column: first?.column ?? null, message: `the positions are projected numbers (for example ${first?.message.split(' are ')[0] ?? ''}), not degrees, and no coordinate system was chosen: map them as x/y and choose an EPSG code` });
		}
		if (this.suppressed) errors.push({ file, row: null, column: null, message: `and ${this.suppressed} more problems not listed` });
		if (this.count === 0 && errors.length === 0) errors.push({ file, row: null, column: null, message: 'has no data rows' });
		const warnings = [...this.warnings];
		if (this.naiveTimes > 0) {
			const off = this.mapping.time?.utcOffsetMin ?? 0;
			warnings.push({ file, row: null, column: null, message: `times carry no UTC offset; they were read as ${off ? `UTC${off > 0 ? '+' : '-'}${Math.abs(off) / 60} h` : 'UTC'}` });
		}
		const extras: FixExtras = {};
		if (errors.length) return { fixes: null, extras, warnings, errors };
		const n = this.count;
		const s = this.mapping.spray!;
		const spray: FixColumns['spray'] =
			s.kind === 'nozzles'
				? { kind: 'nozzles', nozzleCount: this.nozzleCount, nozzleWords: this.nozzleWords, bits: this.bits!.final(n) }
				: s.kind === 'activeWidth'
					? { kind: 'activeWidth', widthM: this.sprayValue!.final(n) }
					: { kind: 'fraction', fraction: this.sprayValue!.final(n) };
		const fixes: FixColumns = {
			count: n,
			timeS: this.timeS.final(n),
			lng: this.lng.final(n),
			lat: this.lat.final(n),
			spray,
			sourceRow: this.sourceRow.final(n)
		};
		if (this.master) fixes.master = this.master.final(n);
		for (const o of this.optional) {
			const arr = o.out.final(n);
			if (FIX_COLUMNS.has(o.key)) fixes[o.key as 'rateLPerM2'] = arr;
			else extras[o.key as keyof FixExtras] = arr;
		}
		return { fixes, extras, warnings, errors };
	}
}

function validParts(Y: number, Mo: number, D: number, h: number, mi: number, s: number): boolean {
	if (Mo < 1 || Mo > 12 || D < 1 || h > 23 || mi > 59 || s > 60) return false;
	return D <= new Date(Date.UTC(Y, Mo, 0)).getUTCDate();
}

function readSwitch(cell: Cell): 0 | 1 | null {
	if (typeof cell === 'boolean') return cell ? 1 : 0;
	if (typeof cell === 'number') return cell > 0 ? 1 : 0;
	const s = String(cell ?? '').trim().toLowerCase();
	if (s === '1' || s === 'on' || s === 'true' || s === 'yes' || s === 't' || s === 'y') return 1;
	if (s === '0' || s === 'off' || s === 'false' || s === 'no' || s === 'f' || s === 'n' || s === '') return s === '' ? 1 : 0;
	return null;
}
