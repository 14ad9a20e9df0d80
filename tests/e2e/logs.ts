// Small invented logs for end-to-end tests, with figures that can be checked by hand, laid inside
// a field of the demo farm whatever its shape: passes run east-west through the middle of its
// bounding box, where the demo's fields are solid.
import type { APIRequestContext } from '@playwright/test';

const mPerDegLat = 111_195; // mean metres per degree of latitude (spherical, good to ~0.3%)

export type Box = { west: number; south: number; east: number; north: number };

/** The bounding box of a field of the signed-in user's farm, from the app's own GeoJSON. */
export async function fieldBox(request: APIRequestContext, farm: string, name: string): Promise<Box> {
	const body = await (await request.get(`/api/farms/${farm}/fields/geojson`)).json();
	const feature = body.features.find((f: { properties: { name: string } }) => f.properties.name === name);
	if (!feature) throw new Error(`no field ${name}`);
	const box = { west: Infinity, south: Infinity, east: -Infinity, north: -Infinity };
	const walk = (c: unknown): void => {
		if (Array.isArray(c) && typeof c[0] === 'number') {
			box.west = Math.min(box.west, c[0]);
			box.east = Math.max(box.east, c[0]);
			box.south = Math.min(box.south, c[1]);
			box.north = Math.max(box.north, c[1]);
		} else if (Array.isArray(c)) c.forEach(walk);
	};
	walk(feature.geometry.coordinates);
	return box;
}

/**
 * Straight east-west passes across the middle third of `box` at 18 km/h, 5 fixes a second,
 * every other nozzle open (a 50% checkerboard across the boom), 36.576 m apart so they just touch.
 */
export function passesCsv(box: Box, { passes = 2, nozzles = 144, day = '2026-09-15' } = {}) {
	const lines = ['Fix time (UTC),Lat (deg),Lon (deg),Speed [km/h],Nozzle states'];
	const start = Date.parse(`${day}T16:00:00Z`) / 1000;
	const speedMPerS = 18 / 3.6;
	const width = box.east - box.west;
	const westLng = box.west + width / 3;
	const eastLng = box.east - width / 3;
	const midLat = (box.south + box.north) / 2;
	const mPerDegLng = mPerDegLat * Math.cos((midLat * Math.PI) / 180);
	const lengthM = (eastLng - westLng) * mPerDegLng;
	const steps = Math.round(lengthM / (speedMPerS * 0.2));
	const pattern = Array.from({ length: nozzles }, (_, k) => (k % 2 === 0 ? '1' : '0')).join('');
	let t = start;
	for (let p = 0; p < passes; p++) {
		const lat = midLat + (p * 36.576) / mPerDegLat;
		for (let i = 0; i <= steps; i++) {
			const f = i / steps;
			const lng = p % 2 === 0 ? westLng + f * (eastLng - westLng) : eastLng - f * (eastLng - westLng);
			lines.push(`${new Date(t * 1000).toISOString()},${lat.toFixed(8)},${lng.toFixed(8)},18.0,${pattern}`);
			t += 0.2;
		}
		t += 20; // the turn: a gap longer than 3 s is not drawn
	}
	return { csv: lines.join('\n') + '\n', lengthM, passes, day };
}
