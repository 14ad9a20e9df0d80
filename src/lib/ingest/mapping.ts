// The column mapping: which of a log's own columns (or feature attributes) carry the canonical
// meanings of a fix, in which units. Detection is by name only, tolerant of case, spacing,
// underscores and units written in brackets; values are then sampled for the kind of time,
// the nozzle columns and the decimal separator.
import type { FlowUnit, LengthUnit, PressureUnit, RateUnit, SpeedUnit } from './units';

export type TimeMapping = (
	| { kind: 'iso'; column: string }
	| { kind: 'epoch'; column: string; unit: 's' | 'ms' }
	/** A date column and a time-of-day column. */
	| { kind: 'dateAndTime'; dateColumn: string; timeColumn: string; dateOrder: 'ymd' | 'dmy' | 'mdy' }
) & {
	/** Minutes east of UTC for times written without an offset; 0 (UTC) when absent. */
	utcOffsetMin?: number;
};

/** An EPSG code, or a proj4 definition string. */
export type Crs = number | string;

export type PositionMapping =
	| { kind: 'lngLat'; lng: string; lat: string }
	| { kind: 'xy'; x: string; y: string; crs: Crs | null }
	/** Point geometry of GeoJSON features or shapefile records; crs for projected shapefiles. */
	| { kind: 'geometry'; crs?: Crs | null };

export type SprayMapping =
	/** '0'/'1' strings, one character per nozzle, concatenated from the columns in this order. */
	| { kind: 'nozzles'; columns: string[] }
	| { kind: 'activeWidth'; column: string; unit: LengthUnit }
	| { kind: 'fraction'; column: string; scale: 'unit' | 'percent' };

export type ValueColumn<U> = { column: string; unit: U };

export type ColumnMapping = {
	time: TimeMapping | null;
	position: PositionMapping | null;
	spray: SprayMapping | null;
	speed?: ValueColumn<SpeedUnit>;
	/** Degrees clockwise from north. */
	heading?: { column: string };
	master?: { column: string };
	rate?: ValueColumn<RateUnit>;
	flow?: ValueColumn<FlowUnit>;
	pressure?: ValueColumn<PressureUnit>;
	boomHeight?: ValueColumn<LengthUnit>;
	/** Numbers written with a decimal comma ("47,123"). */
	decimalComma?: boolean;
};

type Role =
	| 'time'
	| 'date'
	| 'lat'
	| 'lng'
	| 'x'
	| 'y'
	| 'nozzles'
	| 'activeWidth'
	| 'fraction'
	| 'speed'
	| 'heading'
	| 'master'
	| 'rate'
	| 'flow'
	| 'pressure'
	| 'boomHeight';

// Names in plain trade words, normalised (lower case, single spaces, no units).
const SYNONYMS: Record<Role, string[]> = {
	time: ['time', 'timestamp', 'datetime', 'date time', 'gps time', 'utc', 'utc time', 'time utc', 'epoch', 'unix time', 'log time', 'fix time', 'recorded at'],
	date: ['date', 'gps date', 'utc date', 'log date'],
	lat: ['lat', 'latitude', 'gps lat', 'gps latitude', 'lat deg', 'lat wgs84', 'latitude wgs84', 'boom lat', 'centre lat', 'center lat'],
	lng: ['lon', 'lng', 'long', 'longitude', 'gps lon', 'gps lng', 'gps longitude', 'lon deg', 'lon wgs84', 'longitude wgs84', 'boom lon', 'centre lon', 'center lon'],
	x: ['x', 'easting', 'east', 'x coord', 'x coordinate', 'utm x', 'utm easting'],
	y: ['y', 'northing', 'north', 'y coord', 'y coordinate', 'utm y', 'utm northing'],
	nozzles: ['nozzles', 'nozzle', 'nozzle states', 'nozzle state', 'nozzle status', 'nozzle bits', 'nozzle on', 'noz', 'sections', 'section states', 'section status', 'valves', 'valve states', 'spray states', 'nozzle map'],
	activeWidth: ['active width', 'spray width', 'sprayed width', 'width on', 'active boom width', 'working width on', 'on width'],
	fraction: ['sprayed fraction', 'spray fraction', 'fraction sprayed', 'sprayed share', 'percent sprayed', 'sprayed percent', 'coverage', 'spray coverage', 'on fraction', 'duty'],
	speed: ['speed', 'ground speed', 'gps speed', 'velocity', 'travel speed', 'vehicle speed'],
	heading: ['heading', 'course', 'bearing', 'track', 'direction', 'cog', 'course over ground', 'gps heading'],
	master: ['master', 'master switch', 'boom master', 'master on', 'spray on', 'master state', 'main switch', 'boom on'],
	rate: ['rate', 'applied rate', 'app rate', 'application rate', 'as applied rate', 'rate applied', 'volume rate', 'actual rate', 'spray rate'],
	flow: ['flow', 'flow rate', 'boom flow', 'total flow', 'flowrate', 'liquid flow'],
	pressure: ['pressure', 'boom pressure', 'spray pressure', 'line pressure'],
	boomHeight: ['boom height', 'nozzle height', 'height above ground', 'boom ht']
};

/** "  Rate [L/ha] " -> { name: 'rate', unit: 'l/ha' }. Brackets and parentheses hold units. */
export function normalizeHeader(header: string): { name: string; unit: string | null } {
	let unit: string | null = null;
	const stripped = header.replace(/[[(]([^\])]*)[\])]/g, (_, inner: string) => {
		unit ??= inner.trim().toLowerCase();
		return ' ';
	});
	const name = stripped
		.replace(/([a-z])([A-Z])/g, '$1 $2')
		.toLowerCase()
		.replace(/[\s_\-.:/]+/g, ' ')
		.trim();
	return { name, unit };
}

const UNIT_WORDS: [RegExp, string][] = [
	[/^(km\/?h|kmh|kph|kmph|km\/hr|kilometres? per hour)$/, 'km/h'],
	[/^(mph|mi\/h|miles per hour)$/, 'mph'],
	[/^(m\/s|ms|mps|m s)$/, 'm/s'],
	[/^(l\/ha|lha|l ha|litres? per hectare|liters? per hectare)$/, 'L/ha'],
	[/^(gal\/ac|gpa|gal ac|gal\/acre|us gal\/ac|gallons per acre)$/, 'gal/ac'],
	[/^(l\/min|lpm|lmin|l min)$/, 'L/min'],
	[/^(gal\/min|gpm|gal min|us gal\/min)$/, 'gal/min'],
	[/^bar$/, 'bar'],
	[/^psi$/, 'psi'],
	[/^kpa$/, 'kPa'],
	[/^(m|metres?|meters?)$/, 'm'],
	[/^(ft|feet|foot)$/, 'ft'],
	[/^cm$/, 'cm'],
	[/^(in|inch|inches)$/, 'in'],
	[/^(%|pct|percent)$/, '%'],
	[/^(s|sec|seconds?)$/, 's'],
	[/^(ms|millis|milliseconds?)$/, 'ms']
];

function canonicalUnit(text: string | null): string | null {
	if (!text) return null;
	const t = text.trim().toLowerCase();
	for (const [re, unit] of UNIT_WORDS) if (re.test(t)) return unit;
	return null;
}

type Match = { role: Role; score: number; unit: string | null };

/** Best meaning for one header: exact synonym 3, synonym plus a unit word 2, synonym words
 * inside a longer name 1 (longer synonyms win ties). */
function matchHeader(header: string): Match | null {
	const { name, unit: bracketUnit } = normalizeHeader(header);
	let best: (Match & { len: number }) | null = null;
	const consider = (m: Match & { len: number }) => {
		if (!best || m.score > best.score || (m.score === best.score && m.len > best.len)) best = m;
	};
	for (const role of Object.keys(SYNONYMS) as Role[]) {
		for (const syn of SYNONYMS[role]) {
			if (name === syn) consider({ role, score: 3, unit: canonicalUnit(bracketUnit), len: syn.length });
			else if (name.startsWith(syn + ' ')) {
				const rest = name.slice(syn.length + 1);
				const unit = canonicalUnit(rest) ?? canonicalUnit(rest.replace(/ /g, '/'));
				if (unit) consider({ role, score: 2, unit, len: syn.length });
				else consider({ role, score: 1, unit: canonicalUnit(bracketUnit), len: syn.length });
			} else if (` ${name} `.includes(` ${syn} `)) {
				consider({ role, score: 1, unit: canonicalUnit(bracketUnit), len: syn.length });
			}
		}
	}
	return best;
}

const NUMBER_RE = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$/;
const DECIMAL_COMMA_RE = /^[+-]?\d*,\d+$/;
const BITS_RE = /^[01]+$/;
const ISO_RE =
	/^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d+))?)?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?$/i;

/** Proposes a mapping from header names and a few rows (strings as the file holds them). Roles
 * not found are left null/absent; the user completes them in the mapping step. */
export function detectMapping(headers: string[], sampleRows: string[][]): ColumnMapping {
	const matches = headers.map((h) => matchHeader(h));
	const column = (i: number) => sampleRows.map((r) => (r[i] ?? '').trim()).filter((v) => v !== '');
	const pick = (role: Role, exclude = new Set<number>()): { index: number; unit: string | null } | null => {
		let best: { index: number; score: number; unit: string | null } | null = null;
		matches.forEach((m, index) => {
			if (m && m.role === role && !exclude.has(index) && (!best || m.score > best.score))
				best = { index, score: m.score, unit: m.unit };
		});
		return best;
	};
	const mapping: ColumnMapping = { time: null, position: null, spray: null };

	// Decimal commas: only possible when the delimiter is not a comma, so a cell can hold one.
	const numericCells = sampleRows.flat().filter((c) => NUMBER_RE.test(c.trim()));
	mapping.decimalComma = numericCells.some((c) => DECIMAL_COMMA_RE.test(c.trim())) && !numericCells.some((c) => /^[+-]?\d*\.\d+$/.test(c.trim()));

	const time = pick('time');
	const date = pick('date');
	if (time) {
		const values = column(time.index);
		const numeric = values.length > 0 && values.every((v) => NUMBER_RE.test(v));
		const clockOnly = values.length > 0 && values.every((v) => /^\d{1,2}:\d{2}(:\d{2}([.,]\d+)?)?$/.test(v));
		if (clockOnly && date) {
			mapping.time = { kind: 'dateAndTime', dateColumn: headers[date.index], timeColumn: headers[time.index], dateOrder: guessDateOrder(column(date.index), mapping.decimalComma) };
		} else if (numeric) {
			const big = values.some((v) => Math.abs(Number(v.replace(',', '.'))) > 1e11);
			mapping.time = { kind: 'epoch', column: headers[time.index], unit: time.unit === 'ms' || big ? 'ms' : 's' };
		} else mapping.time = { kind: 'iso', column: headers[time.index] };
	} else if (date) {
		const values = column(date.index);
		if (values.some((v) => ISO_RE.test(v) && /[T ]\d/.test(v))) mapping.time = { kind: 'iso', column: headers[date.index] };
	}

	const lat = pick('lat');
	const lng = pick('lng');
	const x = pick('x');
	const y = pick('y');
	if (lat && lng) mapping.position = { kind: 'lngLat', lng: headers[lng.index], lat: headers[lat.index] };
	else if (x && y) mapping.position = { kind: 'xy', x: headers[x.index], y: headers[y.index], crs: null };

	// Nozzle columns: named like nozzles and holding only 0/1 characters, in file order.
	const nozzleColumns: string[] = [];
	matches.forEach((m, i) => {
		if (m?.role !== 'nozzles') return;
		const values = column(i);
		if (values.length === 0 || values.every((v) => BITS_RE.test(v))) nozzleColumns.push(headers[i]);
	});
	const activeWidth = pick('activeWidth');
	const fraction = pick('fraction');
	if (nozzleColumns.length) mapping.spray = { kind: 'nozzles', columns: nozzleColumns };
	else if (activeWidth) mapping.spray = { kind: 'activeWidth', column: headers[activeWidth.index], unit: asLength(activeWidth.unit) };
	else if (fraction) {
		const values = column(fraction.index).map((v) => Number(v.replace(',', '.')));
		const percent = fraction.unit === '%' || values.some((v) => v > 1);
		mapping.spray = { kind: 'fraction', column: headers[fraction.index], scale: percent ? 'percent' : 'unit' };
	}

	const speed = pick('speed');
	if (speed) mapping.speed = { column: headers[speed.index], unit: speed.unit === 'mph' || speed.unit === 'm/s' ? speed.unit : 'km/h' };
	const heading = pick('heading');
	if (heading) mapping.heading = { column: headers[heading.index] };
	const master = pick('master');
	if (master) mapping.master = { column: headers[master.index] };
	const rate = pick('rate');
	if (rate) mapping.rate = { column: headers[rate.index], unit: rate.unit === 'gal/ac' ? 'gal/ac' : 'L/ha' };
	const flow = pick('flow');
	if (flow) mapping.flow = { column: headers[flow.index], unit: flow.unit === 'gal/min' ? 'gal/min' : 'L/min' };
	const pressure = pick('pressure');
	if (pressure) mapping.pressure = { column: headers[pressure.index], unit: pressure.unit === 'psi' || pressure.unit === 'kPa' ? pressure.unit : 'bar' };
	const boomHeight = pick('boomHeight');
	if (boomHeight) mapping.boomHeight = { column: headers[boomHeight.index], unit: asLength(boomHeight.unit) };
	return mapping;
}

function asLength(unit: string | null): LengthUnit {
	return unit === 'ft' || unit === 'cm' || unit === 'in' ? unit : 'm';
}

/** Day-first or month-first from a value above 12; without one, day-first where decimal commas
 * are used (common practice, no source), else month-first. */
function guessDateOrder(values: string[], decimalComma: boolean | undefined): 'ymd' | 'dmy' | 'mdy' {
	if (values.some((v) => /^\d{4}[-/.]/.test(v))) return 'ymd';
	for (const v of values) {
		const m = /^(\d{1,2})[-/.](\d{1,2})[-/.]\d{2,4}$/.exec(v);
		if (!m) continue;
		if (Number(m[1]) > 12) return 'dmy';
		if (Number(m[2]) > 12) return 'mdy';
	}
	return decimalComma ? 'dmy' : 'mdy';
}

/** Columns a mapping refers to, for checking they exist. */
export function mappedColumns(mapping: ColumnMapping): { role: string; column: string }[] {
	const out: { role: string; column: string }[] = [];
	const t = mapping.time;
	if (t?.kind === 'dateAndTime') out.push({ role: 'date', column: t.dateColumn }, { role: 'time', column: t.timeColumn });
	else if (t) out.push({ role: 'time', column: t.column });
	const p = mapping.position;
	if (p?.kind === 'lngLat') out.push({ role: 'longitude', column: p.lng }, { role: 'latitude', column: p.lat });
	else if (p?.kind === 'xy') out.push({ role: 'x', column: p.x }, { role: 'y', column: p.y });
	const s = mapping.spray;
	if (s?.kind === 'nozzles') for (const c of s.columns) out.push({ role: 'nozzle states', column: c });
	else if (s) out.push({ role: s.kind === 'activeWidth' ? 'active width' : 'sprayed fraction', column: s.column });
	const optional: [string, { column: string } | undefined][] = [
		['speed', mapping.speed],
		['heading', mapping.heading],
		['master switch', mapping.master],
		['applied rate', mapping.rate],
		['flow', mapping.flow],
		['pressure', mapping.pressure],
		['boom height', mapping.boomHeight]
	];
	for (const [role, v] of optional) if (v) out.push({ role, column: v.column });
	return out;
}

export { ISO_RE };
