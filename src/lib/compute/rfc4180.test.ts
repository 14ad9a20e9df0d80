// RFC 4180 (Common Format and MIME Type for CSV Files, section 2): CRLF after every record,
// fields with commas, quotes or line breaks in double quotes, inner quotes doubled. Read back
// with papaparse, an independent parser.
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { csvField, fixed, toCsv } from './rfc4180';

describe('RFC 4180 CSV', () => {
	it('ends every record with CRLF, the last one too (rule 1 and 2)', () => {
		expect(toCsv(['a', 'b'], [[1, 2], [3, 4]])).toBe('a,b\r\n1,2\r\n3,4\r\n');
	});

	it('quotes fields with commas, quotes and line breaks and doubles inner quotes (rules 6 and 7)', () => {
		expect(csvField('North, wet')).toBe('"North, wet"');
		expect(csvField('the "old" patch')).toBe('"the ""old"" patch"');
		expect(csvField('two\nlines')).toBe('"two\nlines"');
		expect(csvField('cr\rlf')).toBe('"cr\rlf"');
		expect(csvField('plain')).toBe('plain');
	});

	it('leaves empty what is missing and keeps formulas from running', () => {
		expect(csvField(null)).toBe('');
		expect(csvField(undefined)).toBe('');
		expect(csvField(NaN)).toBe('');
		expect(csvField(-3.5)).toBe('-3.5');
		expect(csvField('-3.5')).toBe('-3.5');
		expect(csvField('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
		expect(csvField('@sum')).toBe("'@sum");
	});

	it('round-trips through an independent parser', () => {
		const rows = [['Patch, "north"', 1.5, null], ['line\nbreak', -0.25, 'é ü']];
		const text = toCsv(['zone', 'area_ha', 'note'], rows);
		const parsed = Papa.parse<string[]>(text, { newline: '\r\n', skipEmptyLines: true });
		expect(parsed.errors).toEqual([]);
		expect(parsed.data).toEqual([['zone', 'area_ha', 'note'], ['Patch, "north"', '1.5', ''], ['line\nbreak', '-0.25', 'é ü']]);
	});

	it('refuses a row whose width differs from the header', () => {
		expect(() => toCsv(['a', 'b'], [[1]])).toThrow(/row 1 has 1 fields/);
	});

	it('rounds numbers for a cell without printing -0', () => {
		expect(fixed(-0.00001, 3)).toBe(0);
		expect(Object.is(fixed(-0.00001, 3), -0)).toBe(false);
		expect(fixed(1.23456, 2)).toBe(1.23);
		expect(fixed(null, 2)).toBeNull();
	});
});
