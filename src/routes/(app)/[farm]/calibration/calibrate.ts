// The calibration page's arithmetic: what people typed, in their units, checked with a message
// naming the field, then the trade's own formulas in those units ($lib/compute/calibration).
import {
	flowAtPressure,
	galPerAcFromFlow,
	galPerMinForRate,
	GPA_CONSTANT,
	L_PER_HA_CONSTANT,
	lPerHaFromFlow,
	lPerMinForRate,
	partialLoad,
	pressureForFlow,
	tankLoad
} from '$lib/compute/calibration';
import { fromSi, toSi, type Quantity, type UnitOf } from '$lib/compute/units';
import { formatNumber, type UnitSystem } from '$lib/format';

export type CalibrationText = {
	rate: string;
	speed: string;
	spacing: string;
	ratedFlow: string;
	ratedPressure: string;
	tank: string;
	area: string;
};

export type MixForCalibration = {
	carrierRateLPerM2: number;
	products: { name: string; unit: 'L' | 'kg'; ratePerM2: number }[];
};

/** The unit each input is typed in. */
export function inputUnits(system: UnitSystem) {
	return system === 'us'
		? ({ rate: 'gal/ac', speed: 'mph', spacing: 'in', flow: 'gal/min', pressure: 'psi', tank: 'gal', area: 'ac' } as const)
		: ({ rate: 'L/ha', speed: 'km/h', spacing: 'cm', flow: 'L/min', pressure: 'bar', tank: 'L', area: 'ha' } as const);
}

// Plausible ranges, SI (common practice, no source): wide enough for any field sprayer, narrow
// enough to catch a value typed in the wrong unit.
const ranges = {
	rate: ['volumePerArea', [5e-4, 500e-4], 'target rate'],
	speed: ['speed', [1 / 3.6, 40 / 3.6], 'speed'],
	spacing: ['length', [0.05, 1], 'nozzle spacing'],
	ratedFlow: ['flow', [0.05 / 60, 20 / 60], 'rated nozzle flow'],
	ratedPressure: ['pressure', [0.3e5, 15e5], 'rated pressure'],
	tank: ['volume', [1, 50_000], 'tank volume'],
	area: ['area', [1, 1e8], 'area to spray']
} as const;

type Key = keyof typeof ranges;

/** Converts every typed number between unit systems, for the units switch. */
export function convertText(text: CalibrationText, from: UnitSystem, to: UnitSystem): CalibrationText {
	const a = inputUnits(from);
	const b = inputUnits(to);
	const unitOf = { rate: 'rate', speed: 'speed', spacing: 'spacing', ratedFlow: 'flow', ratedPressure: 'pressure', tank: 'tank', area: 'area' } as const;
	const out = { ...text };
	for (const key of Object.keys(ranges) as Key[]) {
		const n = Number(text[key].replace(',', '.'));
		if (text[key].trim() === '' || !Number.isFinite(n)) continue;
		const quantity = ranges[key][0] as Quantity;
		const si = toSi(quantity, n, a[unitOf[key]] as UnitOf<Quantity>);
		out[key] = String(Number(fromSi(quantity, si, b[unitOf[key]] as UnitOf<Quantity>).toPrecision(4)));
	}
	return out;
}

export type Calibration = {
	problems: Partial<Record<Key, string>>;
	/** Nozzle flow for the target rate, in the typed flow unit, with the formula worked through. */
	flow: { value: number; working: string } | null;
	/** Pressure for that flow from the nozzle's rating, and the rate the rated flow gives. */
	pressure: { value: number; ratio: number; working: string; rateAtRated: number } | null;
	tank: { areaSi: number; products: { name: string; unit: 'L' | 'kg'; amountSi: number }[] } | null;
	part: { carrierSi: number; products: { name: string; unit: 'L' | 'kg'; amountSi: number }[] } | null;
};

export function calibrate(text: CalibrationText, system: UnitSystem, mix: MixForCalibration | null): Calibration {
	const u = inputUnits(system);
	const problems: Calibration['problems'] = {};
	const unitFor: Record<Key, string> = { rate: u.rate, speed: u.speed, spacing: u.spacing, ratedFlow: u.flow, ratedPressure: u.pressure, tank: u.tank, area: u.area };

	/** The typed number in its unit, or null (empty, or a problem recorded). */
	const read = (key: Key): number | null => {
		const raw = text[key].trim();
		if (raw === '') return null;
		const n = Number(raw.replace(',', '.'));
		const [quantity, [lo, hi], label] = ranges[key];
		const unit = unitFor[key];
		const name = label[0].toUpperCase() + label.slice(1);
		if (!Number.isFinite(n)) {
			problems[key] = `${name} must be a number in ${unit}, like 12.5.`;
			return null;
		}
		const si = toSi(quantity as Quantity, n, unit as UnitOf<Quantity>);
		if (!(si >= lo * (1 - 1e-9) && si <= hi * (1 + 1e-9))) {
			const show = (v: number) => formatNumber(fromSi(quantity as Quantity, v, unit as UnitOf<Quantity>), 3);
			problems[key] = `${name} must be between ${show(lo)} and ${show(hi)} ${unit}.`;
			return null;
		}
		return n;
	};

	const rate = read('rate');
	const speed = read('speed');
	const spacing = read('spacing');
	const ratedFlow = read('ratedFlow');
	const ratedPressure = read('ratedPressure');
	const tank = read('tank');
	const area = read('area');
	const n = (v: number, s = 4) => formatNumber(v, s);

	let flow: Calibration['flow'] = null;
	if (rate !== null && speed !== null && spacing !== null) {
		const value = system === 'us' ? galPerMinForRate(rate, speed, spacing) : lPerMinForRate(rate, speed, spacing);
		const constant = system === 'us' ? GPA_CONSTANT : L_PER_HA_CONSTANT;
		flow = {
			value,
			working: `${n(value)} ${u.flow} = ${n(rate)} ${u.rate} × ${n(speed)} ${u.speed} × ${n(spacing)} ${u.spacing} ÷ ${constant.toLocaleString('en-US')}`
		};
	}

	let pressure: Calibration['pressure'] = null;
	if (flow && ratedFlow !== null && ratedPressure !== null) {
		const value = pressureForFlow(ratedFlow, ratedPressure, flow.value);
		const rateAtRated = system === 'us' ? galPerAcFromFlow(ratedFlow, speed!, spacing!) : lPerHaFromFlow(ratedFlow, speed!, spacing!);
		pressure = {
			value,
			ratio: value / ratedPressure,
			working: `${n(value)} ${u.pressure} = ${n(ratedPressure)} ${u.pressure} × (${n(flow.value)} ÷ ${n(ratedFlow)})²`,
			rateAtRated
		};
		// Same law the other way: a consistency check the page does not show.
		if (Math.abs(flowAtPressure(ratedFlow, ratedPressure, value) - flow.value) > 1e-9 * flow.value) throw new Error('calibration: pressure law disagrees');
	}

	let tankResult: Calibration['tank'] = null;
	let part: Calibration['part'] = null;
	if (mix) {
		if (tank !== null) {
			const load = tankLoad(toSi('volume', tank, u.tank), mix.carrierRateLPerM2, mix.products);
			tankResult = { areaSi: load.areaM2, products: mix.products.map((p, i) => ({ name: p.name, unit: p.unit, amountSi: load.products[i] })) };
		}
		if (area !== null) {
			const load = partialLoad(toSi('area', area, u.area), mix.carrierRateLPerM2, mix.products);
			part = { carrierSi: load.carrierL, products: mix.products.map((p, i) => ({ name: p.name, unit: p.unit, amountSi: load.products[i] })) };
		}
	}
	return { problems, flow, pressure, tank: tankResult, part };
}

