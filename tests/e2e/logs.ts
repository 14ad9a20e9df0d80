// Small invented logs for end-to-end tests, with figures that can be checked by hand.
// North Flat (scripts/seed.ts) spans -118.32..-118.30 E, 47.12..47.129 N.

const mPerDegLat = 111_195; // mean metres per degree of latitude (spherical, good to ~0.3%)

/**
 * Straight east-west passes across North Flat at 18 km/h, 5 fixes a second, every other nozzle
 * open (a 50% checkerboard across the boom), passes 36.576 m apart so they just touch.
 */
export function northFlatPassesCsv({ passes = 2, nozzles = 144 } = {}) {
	const lines = ['Fix time (UTC),Lat (deg),Lon (deg),Speed [km/h],Nozzle states'];
	const start = Date.parse('2026-05-04T16:00:00Z') / 1000;
	const speedMPerS = 18 / 3.6;
	const westLng = -118.318;
	const eastLng = -118.302;
	const mPerDegLng = mPerDegLat * Math.cos((47.1245 * Math.PI) / 180);
	const lengthM = (eastLng - westLng) * mPerDegLng;
	const steps = Math.round(lengthM / (speedMPerS * 0.2));
	const pattern = Array.from({ length: nozzles }, (_, k) => (k % 2 === 0 ? '1' : '0')).join('');
	let t = start;
	for (let p = 0; p < passes; p++) {
		const lat = 47.1225 + (p * 36.576) / mPerDegLat;
		for (let i = 0; i <= steps; i++) {
			const f = i / steps;
			const lng = p % 2 === 0 ? westLng + f * (eastLng - westLng) : eastLng - f * (eastLng - westLng);
			lines.push(`${new Date(t * 1000).toISOString()},${lat.toFixed(8)},${lng.toFixed(8)},18.0,${pattern}`);
			t += 0.2;
		}
		t += 20; // the turn: a gap longer than 3 s is not drawn
	}
	return { csv: lines.join('\n') + '\n', lengthM, passes };
}
