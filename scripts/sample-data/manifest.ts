// sample-data/demo/manifest.json: everything a loader needs to build the demo through the
// product's own paths (accounts, farms, boundaries, catalogue, uploads with their mappings).
// Quantities are SI: m, L/s, Pa, L/m2, product units per m2 (1 L/ha = 1e-4 L/m2).
import type { ColumnMapping } from '../../src/lib/ingest/mapping';
import { DEMO_PASSWORD, MAIN_SPRAYER, PRODUCTS, SMALL_SPRAYER, TANK_MIXES, USERS, type Machine } from './catalogue';
import { mappingFor } from './log-files';
import { fullLogs, sampleLogs, type LogSpec } from './schedule';

const PER_HA = 1e-4;

function machineEntry(m: Machine) {
	return {
		name: m.name,
		boomWidthM: m.boomWidthM,
		nozzleCount: m.nozzleCount,
		nozzleSpacingM: m.nozzleSpacingM,
		nozzlesPerSensor: m.nozzlesPerSensor,
		nozzleFlowLPerS: m.nozzleFlowLPerS,
		referencePressurePa: m.referencePressurePa,
		maxSpeedMPerS: m.maxSpeedMPerS,
		targetHeightM: m.targetHeightM,
		heightToleranceM: m.heightToleranceM,
		pressureMinPa: m.pressureMinPa,
		pressureMaxPa: m.pressureMaxPa
	};
}

function catalogue(machines: Machine[], mixNames: string[]) {
	const mixes = TANK_MIXES.filter((t) => mixNames.includes(t.name));
	const used = new Set(mixes.flatMap((t) => t.products.map((p) => p.name)));
	return {
		machines: machines.map(machineEntry),
		products: PRODUCTS.filter((p) => used.has(p.name)),
		tankMixes: mixes.map((t) => ({
			name: t.name,
			carrierRateLPerM2: t.carrierLPerHa * PER_HA,
			products: t.products.map((p) => ({ name: p.name, ratePerM2: Math.round(p.perHa * PER_HA * 1e12) / 1e12 }))
		}))
	};
}

export type ManifestLog = {
	file: string;
	day: string;
	uploadedBy: string;
	machine: string;
	tankMix: string;
	mapping: ColumnMapping;
	/** Not needed to load; says what to expect. */
	season: number;
	fields: string[];
	format: LogSpec['format'];
};

function logEntry(spec: LogSpec): ManifestLog {
	return {
		file: spec.file,
		day: spec.day,
		uploadedBy: spec.uploadedBy,
		machine: spec.machine.name,
		tankMix: spec.tankMix,
		mapping: mappingFor(spec.format, spec.machine.nozzleCount),
		season: spec.season,
		fields: spec.jobs.map((j) => j.field),
		format: spec.format
	};
}

export function buildManifest() {
	const logs = fullLogs();
	const of = (farm: string) => logs.filter((l) => l.farm === farm).map(logEntry);
	return {
		about: 'Patchbook demo data. Everything here is invented: farms, fields, people, e-mail addresses, products, registration numbers and logs. Made by `npm run sample-data`.',
		password: DEMO_PASSWORD,
		users: USERS,
		farms: [
			{
				slug: 'tallowgrass',
				name: 'Tallowgrass Farm',
				region: 'Corran Valley (invented)',
				timeZone: 'America/Los_Angeles',
				currency: 'USD',
				boundaries: 'demo/boundaries/tallowgrass.geojson',
				nameAttribute: 'name',
				cellSizeM: 10,
				members: [
					{ email: 'mara@tallowgrass.example', role: 'manager' },
					{ email: 'dev@fieldwise-agronomy.example', role: 'agronomist' },
					{ email: 'sam@tallowgrass.example', role: 'operator' },
					{ email: 'noor@tallowgrass.example', role: 'operator' },
					{ email: 'helen.marsh@landowner.example', role: 'landlord' },
					{ email: 'arvid.lund@landowner.example', role: 'landlord' }
				],
				grants: [
					{ email: 'helen.marsh@landowner.example', fields: ['North Flat', 'Schoolhouse'], cropSharePercent: 33.3 },
					{ email: 'arvid.lund@landowner.example', fields: ['Long Hill'], cropSharePercent: 25 }
				],
				catalogue: catalogue([MAIN_SPRAYER, SMALL_SPRAYER], TANK_MIXES.map((t) => t.name)),
				logs: of('tallowgrass')
			},
			{
				slug: 'brennan-creek',
				name: 'Brennan Creek Farm',
				region: 'Corran Valley (invented)',
				timeZone: 'America/Los_Angeles',
				currency: 'USD',
				boundaries: 'demo/boundaries/brennan-creek.geojson',
				nameAttribute: 'name',
				cellSizeM: 10,
				members: [
					{ email: 'tom@brennancreek.example', role: 'manager' },
					{ email: 'dev@fieldwise-agronomy.example', role: 'agronomist' }
				],
				grants: [],
				catalogue: catalogue([SMALL_SPRAYER], ['Fallow knockdown']),
				logs: of('brennan-creek')
			}
		],
		/** Short logs committed in sample-data/logs/ (paths relative to sample-data/), all Tallowgrass. */
		samples: sampleLogs().map((s) => ({ ...logEntry(s), file: `logs/${s.file}`, farm: s.farm }))
	};
}
