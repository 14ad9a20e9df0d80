// Application records as CSV (RFC 4180: CRLF line ends, fields with commas, quotes or line breaks
// quoted, quotes doubled; written by papaparse). One row per product of each record, the record's
// columns repeated, units in the header names, numbers plain (no grouping) in the user's units.
import Papa from 'papaparse';
import { celsiusToFahrenheit, fromSi } from '$lib/compute/units';
import { unitsFor, type UnitSystem } from '$lib/format';
import { localTime, type RecordFacts, type RecordInput } from './facts';
import { qualityShares } from './quality-text';
import type { QualitySummary } from '$lib/compute/quality';

export type CsvRecord = {
	status: 'none' | 'draft' | 'signed';
	facts: RecordFacts;
	input: RecordInput;
	signedByName: string | null;
	signedAt: Date | null;
	amendments: unknown[];
	quality: QualitySummary | null;
};

const round = (v: number | null | undefined, decimals: number) =>
	v === null || v === undefined || !Number.isFinite(v) ? '' : Number(v.toFixed(decimals));

const stateNames = { none: 'not started', draft: 'draft', signed: 'signed' } as const;

export function recordsCsv(records: CsvRecord[], system: UnitSystem): string {
	const u = unitsFor[system];
	const area = u.area;
	const liquid = u.volume;
	const dry = u.mass;
	const header = [
		'Record state',
		'Signed by',
		'Signed at (UTC)',
		'Amendments',
		'Date',
		'Start (local time)',
		'End (local time)',
		'Time zone',
		'Client name',
		'Client address',
		'Field',
		'Latitude (deg)',
		'Longitude (deg)',
		'Location description',
		`Field area (${area})`,
		`Area driven over (${area})`,
		`Area sprayed (${area})`,
		'Crop or site',
		'Target weeds',
		'Machine',
		'Tank mix',
		`Carrier rate (${u.carrierRate})`,
		`Total spray volume (${liquid})`,
		'Product',
		'Registration number',
		`Label rate (${u.liquidRate})`,
		`Label rate (${u.dryRate})`,
		`Amount applied (${liquid})`,
		`Amount applied (${dry})`,
		'Applicator name',
		'Certification number',
		'Noncertified applicators supervised',
		`Wind speed (${u.speed})`,
		'Wind from',
		`Air temperature (${u.temperature})`,
		'Relative humidity (%)',
		'Inversion conditions',
		'Notes',
		'Driven above maximum speed (%)',
		'Boom height outside band (%)',
		'Pressure outside range (%)',
		'Gaps in the log (count)'
	];
	const rows: (string | number)[][] = [];
	for (const r of records) {
		const f = r.facts;
		const i = r.input;
		const q = qualityShares(r.quality);
		const common = (p: RecordFacts['products'][number] | null) => [
			stateNames[r.status],
			r.signedByName ?? '',
			r.signedAt ? r.signedAt.toISOString() : '',
			r.amendments.length,
			f.day,
			localTime(f.startedAt, f.timeZone),
			localTime(f.endedAt, f.timeZone),
			f.timeZone,
			i.clientName,
			i.clientAddress,
			f.fieldName,
			round(f.fieldPoint[1], 6),
			round(f.fieldPoint[0], 6),
			i.locationDescription,
			round(fromSi('area', f.fieldAreaM2, area), 4),
			round(fromSi('area', f.coveredM2, area), 4),
			round(fromSi('area', f.sprayedM2, area), 4),
			i.crop,
			i.targetWeeds,
			f.machineName ?? '',
			f.tankMixName,
			round(fromSi('volumePerArea', f.carrierRateLPerM2, u.carrierRate), 3),
			round(fromSi('volume', f.volumeL, liquid), 2),
			p?.name ?? '',
			// Until the applicator records one, the catalogue's number stands in.
			p ? (i.registrationNumbers[p.productId] || p.catalogueRegistration || '') : '',
			p?.unit === 'L' ? round(fromSi('volumePerArea', p.ratePerM2, u.liquidRate), 4) : '',
			p?.unit === 'kg' ? round(fromSi('massPerArea', p.ratePerM2, u.dryRate), 4) : '',
			p?.unit === 'L' ? round(fromSi('volume', p.appliedUnits, liquid), 3) : '',
			p?.unit === 'kg' ? round(fromSi('mass', p.appliedUnits, dry), 3) : '',
			i.applicatorName,
			i.applicatorCertification,
			i.supervisedApplicators,
			i.windSpeedMPerS === null ? '' : round(fromSi('speed', i.windSpeedMPerS, u.speed), 1),
			i.windFrom,
			i.airTemperatureC === null ? '' : round(u.temperature === '°F' ? celsiusToFahrenheit(i.airTemperatureC) : i.airTemperatureC, 1),
			i.relativeHumidityPercent === null ? '' : round(i.relativeHumidityPercent, 1),
			i.inversionNote,
			i.notes,
			round(q.speedPercent, 2),
			round(q.heightPercent, 2),
			round(q.pressurePercent, 2),
			q.gaps ?? ''
		];
		if (f.products.length === 0) rows.push(common(null));
		for (const p of f.products) rows.push(common(p));
	}
	// escapeFormulae: a cell typed as "=HYPERLINK(...)" stays text in a spreadsheet.
	return Papa.unparse({ fields: header, data: rows }, { newline: '\r\n', escapeFormulae: true }) + '\r\n';
}
