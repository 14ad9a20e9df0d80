// The zone table's arithmetic on invented figures that can be checked by hand (DOMAIN.md §3:
// product applied = volume x product rate / carrier rate; broadcast equivalent = covered area x
// product rate), and its CSV: RFC 4180, units in the column names (NIST SP 811 factors).
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { summariseZones, type ApplicationInput, type Area3 } from './zone-summary';
import { columnStem, fixed, zoneSummaryCsv } from './zone-summary-csv';

const gly = { id: 'p-gly', name: 'Glyphosate 540 (demo)', unit: 'L' as const, ratePerM2: 1.5e-4, pricePerUnit: 6.4 };
const apps: ApplicationInput[] = [
	{ id: 'a26', season: 2026, coveredM2: 10_000, sprayedM2: 2_000, volumeL: 20, carrierRateLPerM2: 0.01, products: [gly] },
	{ id: 'a25', season: 2025, coveredM2: 10_000, sprayedM2: 1_000, volumeL: 10, carrierRateLPerM2: 0.01, products: [gly] },
	{ id: 'a24', season: 2024, coveredM2: 10_000, sprayedM2: 9_000, volumeL: 90, carrierRateLPerM2: 0.01, products: [gly] }
];
const parts = new Map<string, Map<string, Area3>>([
	['z1', new Map([['a26', { coveredM2: 1_000, sprayedM2: 800, volumeL: 8 }], ['a25', { coveredM2: 1_000, sprayedM2: 500, volumeL: 5 }]])]
]);
const summary = () =>
	summariseZones({
		season: 2026,
		fieldAreaM2: 10_500,
		zones: [{ id: 'z1', name: 'Wet corner, "north"', areaM2: 1_050, targetRateLPerM2: 0.012 }],
		applications: apps,
		zoneParts: parts
	});

describe('summariseZones', () => {
	it('splits the field into the zone and the rest (hand check)', () => {
		const s = summary();
		expect(s.previousSeason).toBe(2025);
		const [zone, rest, field] = s.rows;
		expect([zone.kind, rest.kind, field.kind]).toEqual(['zone', 'rest', 'field']);
		expect(zone.sharePercent).toBeCloseTo(80, 12);
		expect(rest).toMatchObject({ areaM2: 9_450, coveredM2: 9_000, sprayedM2: 1_200, volumeL: 12 });
		expect(rest.sharePercent).toBeCloseTo((100 * 1_200) / 9_000, 12);
		expect(field).toMatchObject({ areaM2: 10_500, coveredM2: 10_000, sprayedM2: 2_000, volumeL: 20 });
		// Field: 20 L x 1.5e-4 / 0.01 = 0.3 L applied; 10,000 m² x 1.5e-4 = 1.5 L broadcast; 1.2 L saved.
		const p = (r: typeof zone) => r.products[0];
		expect(p(field).appliedUnits).toBeCloseTo(0.3, 12);
		expect(p(field).broadcastUnits).toBeCloseTo(1.5, 12);
		// Zone: 8 L -> 0.12 L applied, 0.15 L broadcast, 0.03 L saved ($0.192 at $6.40/L); the rest the remainder.
		expect(p(zone).appliedUnits).toBeCloseTo(0.12, 12);
		expect(p(zone).savedUnits).toBeCloseTo(0.03, 12);
		expect(p(zone).savedCost).toBeCloseTo(0.192, 12);
		expect(p(rest).savedUnits).toBeCloseTo(1.17, 12);
		expect(p(rest).percentSaved).toBeCloseTo((100 * 1.17) / 1.35, 9);
		// Change against 2025 (not 2024): 80 % now, 50 % then.
		expect(zone.changePp).toBeCloseTo(30, 12);
		expect(field.changePp).toBeCloseTo(10, 12);
		expect(zone.targetRateLPerM2).toBe(0.012);
	});

	it('has no previous season for the first one, and names a zone without figures', () => {
		const s = summariseZones({ season: 2024, fieldAreaM2: 10_500, zones: [], applications: apps, zoneParts: new Map() });
		expect(s.previousSeason).toBeNull();
		expect(s.rows.map((r) => r.kind)).toEqual(['rest', 'field']);
		expect(s.rows[0].changePp).toBeNull();
		expect(() =>
			summariseZones({ season: 2024, fieldAreaM2: 1, zones: [{ id: 'z1', name: 'x', areaM2: 1, targetRateLPerM2: null }], applications: apps, zoneParts: parts })
		).toThrow(/no figures for zone z1 from application a24/);
	});
});

describe('zoneSummaryCsv', () => {
	it('is RFC 4180 with units in the column names, metric', () => {
		const text = zoneSummaryCsv(summary(), { units: 'metric', currency: 'USD', seesMoney: true });
		expect(text.endsWith('\r\n')).toBe(true);
		expect(text.split('\r\n')).toHaveLength(5); // header, zone, rest, field, and the empty string after the last CRLF
		const { data, errors } = Papa.parse<Record<string, string>>(text, { header: true, newline: '\r\n', skipEmptyLines: true });
		expect(errors).toEqual([]);
		expect(Object.keys(data[0])).toEqual([
			'zone', 'row_kind', 'season', 'area_ha', 'covered_ha', 'sprayed_ha', 'treated_share_pct', 'prev_treated_share_pct_2025', 'change_share_pp', 'volume_l', 'target_rate_l_ha',
			'glyphosate_540_demo_applied_l', 'glyphosate_540_demo_broadcast_l', 'glyphosate_540_demo_saved_l', 'glyphosate_540_demo_saved_pct', 'glyphosate_540_demo_saved_usd', 'saved_total_usd'
		]);
		expect(data[0]).toMatchObject({ zone: 'Wet corner, "north"', row_kind: 'zone', area_ha: '0.105', treated_share_pct: '80', change_share_pp: '30', volume_l: '8', target_rate_l_ha: '120' });
		expect(data[0].glyphosate_540_demo_saved_usd).toBe('0.19');
		expect(data[2]).toMatchObject({ zone: 'Whole field', row_kind: 'field', area_ha: '1.05', glyphosate_540_demo_applied_l: '0.3' });
		// The quoted name survives: quotes doubled inside quotes.
		expect(text).toContain('"Wet corner, ""north"""');
	});

	it('US units: acres and gallons in the names and values (NIST SP 811)', () => {
		const text = zoneSummaryCsv(summary(), { units: 'us', currency: 'USD', seesMoney: false });
		const { data } = Papa.parse<Record<string, string>>(text, { header: true, newline: '\r\n', skipEmptyLines: true });
		expect(Object.keys(data[0])).toContain('area_ac');
		expect(Object.keys(data[0])).toContain('volume_gal');
		expect(Object.keys(data[0])).toContain('glyphosate_540_demo_applied_gal');
		// No money for those who may not see prices.
		expect(Object.keys(data[0]).some((k) => k.endsWith('_usd'))).toBe(false);
		// 1,050 m² / 4,046.8564224 m² per acre; 8 L / 3.785411784 L per gal; 120 L/ha = 12.829 gal/ac.
		expect(Number(data[0].area_ac)).toBeCloseTo(1050 / 4046.8564224, 4);
		expect(Number(data[0].volume_gal)).toBeCloseTo(8 / 3.785411784, 3);
		expect(Number(data[0].target_rate_gal_ac)).toBeCloseTo(0.012 / (3.785411784 / 4046.8564224), 3);
	});

	it('rounds numbers for a cell without printing -0', () => {
		expect(Object.is(fixed(-0.00001, 3), -0)).toBe(false);
		expect(fixed(-0.00001, 3)).toBe(0);
		expect(fixed(1.23456, 2)).toBe(1.23);
		expect(fixed(null, 2)).toBeNull();
	});

	it('keeps a zone name that looks like a formula from running in a spreadsheet', () => {
		const s = summary();
		s.rows[0].name = '=HYPERLINK("x")';
		expect(zoneSummaryCsv(s, { units: 'metric', currency: 'USD', seesMoney: false })).toContain(`"'=HYPERLINK(""x"")"`);
	});

	it('makes column stems from product names', () => {
		expect(columnStem('2,4-D Ester 680 (demo)')).toBe('2_4_d_ester_680_demo');
		expect(columnStem('Flumioxazin 51 WG')).toBe('flumioxazin_51_wg');
		expect(columnStem('Éclair')).toBe('eclair');
		expect(columnStem('***')).toBe('product');
	});
});
