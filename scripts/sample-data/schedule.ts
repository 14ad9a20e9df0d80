// Which logs exist: one per operator-day. Every field gets a spring burndown in April each
// season; some get a June pass in 2025 and 2026 (Coyote Draw's 2025 hotspot gets the residual).
import type { Xy } from './frame';
import { MAIN_SPRAYER, NOOR, SAM, SMALL_SPRAYER, TOM, type Machine } from './catalogue';
import type { Pass, Season } from './weeds';

export type LogFormat = 'csv' | 'geojson' | 'shapefile';

export type FieldJob = {
	field: string;
	/** Skip the headland rounds (short samples start straight on the passes). */
	headlands?: boolean;
	/** Cut this field's path after so many metres (short samples). */
	maxLengthM?: number;
};

export type LogSpec = {
	farm: 'tallowgrass' | 'brennan-creek';
	file: string;
	/** Local date (America/Los_Angeles) the log was made. */
	day: string;
	season: Season;
	pass: Pass;
	uploadedBy: string;
	machine: Machine;
	tankMix: string;
	format: LogFormat;
	/** Local clock time the sprayer set off, minutes after midnight. */
	startMin: number;
	jobs: FieldJob[];
	/** Where the log begins; by default 50 m out from the first field's nearest corner to the yard. */
	from?: Xy;
};

/** The farmyard (in Home Place's hole): where every day starts. */
export const YARD: Xy = [1470, 1780];

function addDays(day: string, k: number): string {
	const d = new Date(`${day}T12:00:00Z`);
	d.setUTCDate(d.getUTCDate() + k);
	return d.toISOString().slice(0, 10);
}

const slug = (s: string) => s.toLowerCase().replace(/[^a-z0-9]+/g, '-');
const who = (email: string) => email.split('@')[0];

const SPRING_START: Record<Season, string> = { 2024: '2024-04-09', 2025: '2025-04-14', 2026: '2026-04-13' };

/** Operator-days of the spring burndown, the same plan each season. */
const SPRING_DAYS: { day: number; by: string; fields: string[] }[] = [
	{ day: 0, by: SAM, fields: ['Long Hill'] },
	{ day: 0, by: NOOR, fields: ['North Flat'] },
	{ day: 1, by: SAM, fields: ['Wetland Quarter'] },
	{ day: 1, by: NOOR, fields: ['Coyote Draw', 'Little Draw'] },
	{ day: 2, by: SAM, fields: ['Schoolhouse'] },
	{ day: 2, by: NOOR, fields: ['East Bench'] },
	{ day: 3, by: SAM, fields: ['Home Place'] },
	{ day: 3, by: NOOR, fields: ['Railside'] },
	{ day: 4, by: SAM, fields: ['Split Forty'] }
];

const JUNE: { season: Season; day: string; by: string; field: string; tankMix: string }[] = [
	{ season: 2025, day: '2025-06-10', by: SAM, field: 'Long Hill', tankMix: 'Summer knockdown' },
	{ season: 2025, day: '2025-06-10', by: NOOR, field: 'Coyote Draw', tankMix: 'Residual patch programme' },
	{ season: 2025, day: '2025-06-11', by: SAM, field: 'Wetland Quarter', tankMix: 'Summer knockdown' },
	{ season: 2025, day: '2025-06-11', by: NOOR, field: 'Schoolhouse', tankMix: 'Summer knockdown' },
	{ season: 2026, day: '2026-06-08', by: SAM, field: 'Long Hill', tankMix: 'Summer knockdown' },
	{ season: 2026, day: '2026-06-08', by: NOOR, field: 'Railside', tankMix: 'Summer knockdown' },
	{ season: 2026, day: '2026-06-09', by: SAM, field: 'Wetland Quarter', tankMix: 'Summer knockdown' },
	{ season: 2026, day: '2026-06-09', by: NOOR, field: 'Schoolhouse', tankMix: 'Summer knockdown' }
];

/** A GeoJSON points log and a zipped point shapefile log now and then, as a second terminal would write. */
function formatOf(season: Season, field: string): LogFormat {
	if (field === 'Home Place' && season !== 2025) return 'geojson';
	if (field === 'Split Forty' && season !== 2024) return 'shapefile';
	return 'csv';
}

const EXT: Record<LogFormat, string> = { csv: 'csv', geojson: 'geojson', shapefile: 'zip' };

function fileName(day: string, by: string, fields: string[], format: LogFormat): string {
	return `${day}-${who(by)}-${fields.map(slug).join('-and-')}.${EXT[format]}`;
}

/** Every full-length log of the demo, in upload order. */
export function fullLogs(): LogSpec[] {
	const logs: LogSpec[] = [];
	const seasons: Season[] = [2024, 2025, 2026];
	for (const season of seasons) {
		SPRING_DAYS.forEach((d, k) => {
			const day = addDays(SPRING_START[season], d.day);
			const format = d.fields.length === 1 ? formatOf(season, d.fields[0]) : 'csv';
			logs.push({
				farm: 'tallowgrass',
				file: fileName(day, d.by, d.fields, format),
				day,
				season,
				pass: 'spring',
				uploadedBy: d.by,
				machine: MAIN_SPRAYER,
				tankMix: 'Fallow knockdown',
				format,
				startMin: 7 * 60 + ((k * 17 + season) % 75),
				jobs: d.fields.map((field) => ({ field }))
			});
		});
		JUNE.filter((j) => j.season === season).forEach((j, k) =>
			logs.push({
				farm: 'tallowgrass',
				file: fileName(j.day, j.by, [j.field], 'csv'),
				day: j.day,
				season,
				pass: 'june',
				uploadedBy: j.by,
				machine: MAIN_SPRAYER,
				tankMix: j.tankMix,
				format: 'csv',
				startMin: 6 * 60 + 30 + k * 11,
				jobs: [{ field: j.field }]
			})
		);
	}
	logs.push({
		farm: 'brennan-creek',
		file: fileName('2026-04-21', TOM, ['Creek Bottom', 'Upper Bench'], 'csv'),
		day: '2026-04-21',
		season: 2026,
		pass: 'spring',
		uploadedBy: TOM,
		machine: SMALL_SPRAYER,
		tankMix: 'Fallow knockdown',
		format: 'csv',
		startMin: 7 * 60 + 45,
		jobs: [{ field: 'Creek Bottom' }, { field: 'Upper Bench' }],
		from: [7100, -5500]
	});
	return logs;
}

/** The short logs committed in sample-data/logs/: a few minutes of spraying each. */
export function sampleLogs(): LogSpec[] {
	const base = { farm: 'tallowgrass' as const, uploadedBy: SAM, machine: MAIN_SPRAYER, tankMix: 'Fallow knockdown', pass: 'spring' as const };
	return [
		{ ...base, file: 'sample-north-flat.csv', day: '2026-04-13', season: 2026, uploadedBy: NOOR, format: 'csv', startMin: 9 * 60 + 5, jobs: [{ field: 'North Flat', headlands: false, maxLengthM: 2700 }], from: [560, 1606] },
		{ ...base, file: 'sample-home-place.geojson', day: '2026-04-16', season: 2026, format: 'geojson', startMin: 8 * 60 + 12, jobs: [{ field: 'Home Place', headlands: false, maxLengthM: 1400 }], from: [1300, 1606] },
		{ ...base, file: 'sample-split-forty.zip', day: '2025-04-18', season: 2025, format: 'shapefile', startMin: 7 * 60 + 40, jobs: [{ field: 'Split Forty', headlands: false, maxLengthM: 4200 }], from: [3268, 1200] },
		{ ...base, file: 'sample-two-fields.csv', day: '2026-04-14', season: 2026, uploadedBy: NOOR, format: 'csv', startMin: 13 * 60 + 20, jobs: [{ field: 'Coyote Draw', headlands: false, maxLengthM: 1000 }, { field: 'Little Draw', headlands: false, maxLengthM: 1100 }], from: [2460, 1606] }
	];
}
