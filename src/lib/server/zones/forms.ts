// Zone form values in the user's units, to SI.
import { toSi } from '$lib/compute/units';
import { unitsFor } from '$lib/format';

/** A target rate typed in L/ha or gal/ac (the user's carrier rate unit) as L/m2; empty = not set. */
export function parseTargetRate(raw: string, units: 'metric' | 'us'): { value: number | null } | { error: string } {
	const t = raw.trim().replace(',', '.');
	if (t === '') return { value: null };
	const n = Number(t);
	const unit = unitsFor[units].carrierRate;
	if (!Number.isFinite(n) || n < 0) return { error: `The target rate “${raw.trim()}” is not a number of ${unit} (0 or more; leave it empty for none).` };
	return { value: toSi('volumePerArea', n, unit) };
}

/** A length typed in m or ft as metres. */
export function parseLength(raw: string | null, units: 'metric' | 'us', fallbackM: number): number {
	if (raw === null || raw.trim() === '') return fallbackM;
	const n = Number(raw.trim().replace(',', '.'));
	return Number.isFinite(n) ? toSi('length', n, units === 'us' ? 'ft' : 'm') : NaN;
}

/** A small area typed in m² or acres as m². */
export function parseSmallArea(raw: string | null, units: 'metric' | 'us', fallbackM2: number): number {
	if (raw === null || raw.trim() === '') return fallbackM2;
	const n = Number(raw.trim().replace(',', '.'));
	return Number.isFinite(n) ? toSi('area', n, units === 'us' ? 'ac' : 'm2') : NaN;
}
