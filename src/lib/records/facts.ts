// What an application record holds: the facts that come from the processed log and the
// catalogue (pre-filled, SI units), and what the operator enters. Shared by the server, the
// pages and the CSV, so every place names the elements alike.

export type RecordProductFacts = {
	productId: string;
	name: string;
	unit: 'L' | 'kg';
	/** Broadcast label rate in the tank mix, product unit per m2. */
	ratePerM2: number;
	/** Product actually applied = volume x product rate / carrier rate, L or kg. */
	appliedUnits: number;
	/** The catalogue's registration number when the facts were taken. */
	catalogueRegistration: string | null;
};

/** Pre-filled from the application; copied into the record at sign-off. */
export type RecordFacts = {
	farmName: string;
	timeZone: string;
	fieldId: string;
	fieldName: string;
	fieldAreaM2: number;
	/** A point inside the field, [lng, lat] WGS84. */
	fieldPoint: [number, number];
	/** Local calendar day of the application. */
	day: string;
	season: number;
	/** ISO 8601 instants of the first and last fix. */
	startedAt: string;
	endedAt: string;
	machineName: string | null;
	tankMixName: string;
	carrierRateLPerM2: number;
	/** Area driven over (the boom's width along the track), m2. */
	coveredM2: number;
	/** Area the nozzles actually sprayed, m2. */
	sprayedM2: number;
	/** Total spray liquid, L. */
	volumeL: number;
	products: RecordProductFacts[];
	/** Who uploaded the logs the application came from. */
	uploadedBy: string[];
};

export const compassPoints = ['N', 'NNE', 'NE', 'ENE', 'E', 'ESE', 'SE', 'SSE', 'S', 'SSW', 'SW', 'WSW', 'W', 'WNW', 'NW', 'NNW'] as const;
export type WindFrom = (typeof compassPoints)[number] | 'variable';

/** What the operator enters, SI (wind m/s, air temperature °C). Null or '' = not given. */
export type RecordInput = {
	applicatorName: string;
	applicatorCertification: string;
	supervisedApplicators: string;
	clientName: string;
	clientAddress: string;
	locationDescription: string;
	crop: string;
	targetWeeds: string;
	windSpeedMPerS: number | null;
	windFrom: WindFrom | '';
	airTemperatureC: number | null;
	relativeHumidityPercent: number | null;
	inversionNote: string;
	notes: string;
	/** Per product id. */
	registrationNumbers: Record<string, string>;
};

export const emptyInput = (): RecordInput => ({
	applicatorName: '',
	applicatorCertification: '',
	supervisedApplicators: '',
	clientName: '',
	clientAddress: '',
	locationDescription: '',
	crop: '',
	targetWeeds: '',
	windSpeedMPerS: null,
	windFrom: '',
	airTemperatureC: null,
	relativeHumidityPercent: null,
	inversionNote: '',
	notes: '',
	registrationNumbers: {}
});

/** The elements people see, in the order of the form; labels name the field in every message. */
export const elementLabels: Record<Exclude<keyof RecordInput, 'registrationNumbers'>, string> = {
	applicatorName: 'Applicator name',
	applicatorCertification: 'Certification number',
	supervisedApplicators: 'Noncertified applicators supervised',
	clientName: 'Client (for whom applied)',
	clientAddress: 'Client address',
	locationDescription: 'Location description',
	crop: 'Crop or site',
	targetWeeds: 'Target weeds',
	windSpeedMPerS: 'Wind speed',
	windFrom: 'Wind from',
	airTemperatureC: 'Air temperature',
	relativeHumidityPercent: 'Relative humidity',
	inversionNote: 'Inversion conditions',
	notes: 'Notes'
};

/**
 * Elements a record must have before sign-off: the EPA's record for commercial applicators
 * (40 CFR 171.303(b)(7)) and the former federal private-applicator record (7 CFR 110.3), plus
 * the target and the weather at application that this issue asks of every record.
 */
export const requiredElements = [
	'applicatorName',
	'applicatorCertification',
	'clientName',
	'clientAddress',
	'crop',
	'targetWeeds',
	'windSpeedMPerS',
	'windFrom',
	'airTemperatureC',
	'relativeHumidityPercent'
] as const satisfies (keyof RecordInput)[];

/** The form field an element is typed in (numbers carry no unit in their field's name). */
export function formField(key: keyof RecordInput): string {
	return key === 'windSpeedMPerS' ? 'windSpeed' : key === 'airTemperatureC' ? 'airTemperature' : key === 'relativeHumidityPercent' ? 'relativeHumidity' : key;
}

/** What is missing for sign-off, per form field, as a sentence naming it. */
export function missingForSignOff(input: RecordInput, facts: Pick<RecordFacts, 'products'>): Record<string, string> {
	const missing: Record<string, string> = {};
	for (const key of requiredElements) {
		const value = input[key];
		if (value === null || value === '') missing[formField(key)] = `${elementLabels[key]} is needed before the record can be signed.`;
	}
	for (const p of facts.products) {
		if (!input.registrationNumbers[p.productId]?.trim()) {
			missing[`reg-${p.productId}`] = `The registration number of ${p.name} is needed before the record can be signed.`;
		}
	}
	return missing;
}

/** Local clock time "HH:MM" of an instant in a time zone. */
export function localTime(iso: string, timeZone: string): string {
	return new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date(iso));
}

/** The zone's offset from UTC on that instant: "UTC−7". */
export function utcOffset(iso: string, timeZone: string): string {
	const part = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'shortOffset' })
		.formatToParts(new Date(iso))
		.find((p) => p.type === 'timeZoneName')?.value;
	return (part ?? 'GMT').replace('GMT', 'UTC').replace('-', '−') || 'UTC';
}

/** "06:14–09:32 (UTC−7)". */
export function timeSpan(facts: Pick<RecordFacts, 'startedAt' | 'endedAt' | 'timeZone'>): string {
	return `${localTime(facts.startedAt, facts.timeZone)}–${localTime(facts.endedAt, facts.timeZone)} (${utcOffset(facts.startedAt, facts.timeZone)})`;
}

/** [lng, lat] as "47.11446° N, 118.27819° W". */
export function formatPoint([lng, lat]: [number, number]): string {
	return `${Math.abs(lat).toFixed(5)}° ${lat >= 0 ? 'N' : 'S'}, ${Math.abs(lng).toFixed(5)}° ${lng >= 0 ? 'E' : 'W'}`;
}
