// "Of field": the sprayed area of a season as a share of the field, one pass at a time. A season
// with two applications over the whole field has twice the field's area driven over, so the
// sprayed area is set against the field's area times the number of applications: the mean share
// of the field sprayed per pass, 0..100. The season figures table and the season summary both
// show this number.

/** Sprayed area over (field area × applications), in percent; null with no application or no area. */
export function percentOfFieldSprayed(sprayedM2: number, fieldAreaM2: number, applications: number): number | null {
	const whole = fieldAreaM2 * applications;
	return whole > 0 ? (100 * sprayedM2) / whole : null;
}
