// The record form: what people typed, in their units, turned into a RecordInput (SI), with a
// message per field for anything wrong; weather cautions; and the difference between two inputs
// for an amendment, written as people read it.
import { fahrenheitToCelsius, fromSi, M_PER_S_PER_MPH, toSi } from '$lib/compute/units';
import { formatIn, formatNumber, formatTemperature, unitsFor, type UnitSystem } from '$lib/format';
import { compassPoints, elementLabels, emptyInput, type RecordInput, type WindFrom } from './facts';

export type RecordForm = {
	input: RecordInput;
	/** What was typed, to put back in the form after a refusal. */
	values: Record<string, string>;
	problems: Record<string, string>;
};

// Plausible ranges; typing outside them is almost surely a slip (common practice, no source).
export const recordLimits = {
	/** 0 to about 90 mph. */
	windSpeedMPerS: [0, 40],
	airTemperatureC: [-40, 60],
	relativeHumidityPercent: [0, 100],
	shortText: 200,
	longText: 2000
} as const;

const textKeys = [
	'applicatorName',
	'applicatorCertification',
	'supervisedApplicators',
	'clientName',
	'clientAddress',
	'locationDescription',
	'crop',
	'targetWeeds',
	'inversionNote',
	'notes'
] as const;
const longTexts = new Set<string>(['clientAddress', 'supervisedApplicators', 'locationDescription', 'inversionNote', 'notes', 'targetWeeds']);

const text = (form: FormData, key: string) => {
	const v = form.get(key);
	return typeof v === 'string' ? v.trim() : '';
};

/** A typed number; '' is null. Accepts a decimal comma, as phones in many locales type one. */
function number(raw: string): number | null | 'invalid' {
	if (raw === '') return null;
	const n = Number(raw.replace(',', '.'));
	return Number.isFinite(n) ? n : 'invalid';
}

/** Reads the record form; `products` are the application's products (their registration fields). */
export function parseRecordForm(form: FormData, system: UnitSystem, products: { productId: string; name: string }[]): RecordForm {
	const units = unitsFor[system];
	const input = emptyInput();
	const values: Record<string, string> = {};
	const problems: Record<string, string> = {};

	for (const key of textKeys) {
		const v = text(form, key);
		values[key] = v;
		const max = longTexts.has(key) ? recordLimits.longText : recordLimits.shortText;
		if (v.length > max) problems[key] = `${elementLabels[key]}: use at most ${max} characters (now ${v.length}).`;
		else input[key] = v;
	}

	values.windSpeed = text(form, 'windSpeed');
	const wind = number(values.windSpeed);
	if (wind === 'invalid') problems.windSpeed = `Wind speed must be a number in ${units.speed}, like 8.`;
	else if (wind !== null) {
		const si = toSi('speed', wind, units.speed);
		const [lo, hi] = recordLimits.windSpeedMPerS;
		if (si < lo || si > hi) problems.windSpeed = `Wind speed must be between 0 and ${formatNumber(fromSi('speed', hi, units.speed), 2)} ${units.speed}.`;
		else input.windSpeedMPerS = si;
	}

	values.windFrom = text(form, 'windFrom');
	if (values.windFrom) {
		if (values.windFrom === 'variable' || (compassPoints as readonly string[]).includes(values.windFrom)) input.windFrom = values.windFrom as WindFrom;
		else problems.windFrom = 'Wind from: choose a compass point, or “variable”.';
	}

	values.airTemperature = text(form, 'airTemperature');
	const temperature = number(values.airTemperature);
	if (temperature === 'invalid') problems.airTemperature = `Air temperature must be a number in ${units.temperature}, like 18.`;
	else if (temperature !== null) {
		const celsius = units.temperature === '°F' ? fahrenheitToCelsius(temperature) : temperature;
		const [lo, hi] = recordLimits.airTemperatureC;
		if (celsius < lo || celsius > hi) {
			problems.airTemperature = `Air temperature must be between ${formatTemperature(lo, system)} and ${formatTemperature(hi, system)}.`;
		} else input.airTemperatureC = celsius;
	}

	values.relativeHumidity = text(form, 'relativeHumidity');
	const humidity = number(values.relativeHumidity);
	if (humidity === 'invalid') problems.relativeHumidity = 'Relative humidity must be a number of percent, like 45.';
	else if (humidity !== null) {
		if (humidity < 0 || humidity > 100) problems.relativeHumidity = 'Relative humidity must be between 0 and 100 %.';
		else input.relativeHumidityPercent = humidity;
	}

	for (const p of products) {
		const key = `reg-${p.productId}`;
		const v = text(form, key);
		values[key] = v;
		if (v.length > 60) problems[key] = `Registration number of ${p.name}: use at most 60 characters.`;
		else if (v) input.registrationNumbers[p.productId] = v;
	}
	return { input, values, problems };
}

/** The typed strings that show a saved input in the form, in the user's units. */
export function formValues(input: RecordInput, system: UnitSystem): Record<string, string> {
	const units = unitsFor[system];
	const plain = (v: number) => String(Number(v.toPrecision(6)));
	const values: Record<string, string> = {};
	for (const key of textKeys) values[key] = input[key];
	values.windSpeed = input.windSpeedMPerS === null ? '' : plain(fromSi('speed', input.windSpeedMPerS, units.speed));
	values.windFrom = input.windFrom;
	values.airTemperature =
		input.airTemperatureC === null ? '' : plain(units.temperature === '°F' ? input.airTemperatureC * 1.8 + 32 : input.airTemperatureC);
	values.relativeHumidity = input.relativeHumidityPercent === null ? '' : plain(input.relativeHumidityPercent);
	for (const [id, reg] of Object.entries(input.registrationNumbers)) values[`reg-${id}`] = reg;
	return values;
}

// Stewardship advice absent label limits: spray with wind of at least 3 and at most 8 mph,
// blowing away from sensitive areas; calm air can mean an inversion (DOMAIN.md §6, [R36b]).
const CALM_MPS = 3 * M_PER_S_PER_MPH;
const WINDY_MPS = 8 * M_PER_S_PER_MPH;

/** Cautions about the weather entered. They inform; the label and local rules decide. */
export function weatherCautions(input: RecordInput, system: UnitSystem): string[] {
	const out: string[] = [];
	const speed = (mps: number) => formatIn('speed', mps, unitsFor[system].speed, 2);
	const w = input.windSpeedMPerS;
	if (w !== null && w < CALM_MPS) {
		out.push(
			`Wind under ${speed(CALM_MPS)}: calm air can mean a temperature inversion, which carries fine droplets far. ` +
				(input.inversionNote ? 'Your inversion note is kept with the record.' : 'Say in the inversion note what you saw (smoke or dust hanging, ground fog, a clear still evening).')
		);
	}
	if (w !== null && w > WINDY_MPS) {
		out.push(`Wind over ${speed(WINDY_MPS)}: above what stewardship advice suggests when a label sets no limit. Check the label's wind limit and drift buffers.`);
	}
	return out;
}

/** One element as people read it, for amendments and exports. */
export function displayValue(key: keyof RecordInput, input: RecordInput, system: UnitSystem): string {
	switch (key) {
		case 'windSpeedMPerS':
			return input.windSpeedMPerS === null ? '' : formatIn('speed', input.windSpeedMPerS, unitsFor[system].speed, 3);
		case 'airTemperatureC':
			return input.airTemperatureC === null ? '' : formatTemperature(input.airTemperatureC, system);
		case 'relativeHumidityPercent':
			return input.relativeHumidityPercent === null ? '' : `${formatNumber(input.relativeHumidityPercent, 3, 1)} %`;
		case 'registrationNumbers':
			return Object.values(input.registrationNumbers).join('; ');
		default:
			return String(input[key] ?? '');
	}
}

export type Change = { field: string; label: string; before: string; after: string };

/** What an amendment changes, element by element, in the amending person's units. */
export function changesBetween(before: RecordInput, after: RecordInput, system: UnitSystem, products: { productId: string; name: string }[]): Change[] {
	const changes: Change[] = [];
	for (const key of Object.keys(elementLabels) as (keyof typeof elementLabels)[]) {
		const a = displayValue(key, before, system);
		const b = displayValue(key, after, system);
		// Numbers compare as shown: re-saving 8 mph as 8 mph is no change even if the SI differs in the last bit.
		if (a !== b) changes.push({ field: key, label: elementLabels[key], before: a, after: b });
	}
	for (const p of products) {
		const a = before.registrationNumbers[p.productId] ?? '';
		const b = after.registrationNumbers[p.productId] ?? '';
		if (a !== b) changes.push({ field: `reg-${p.productId}`, label: `Registration number of ${p.name}`, before: a, after: b });
	}
	return changes;
}
