import { describe, expect, it } from 'vitest';
import { grantChanges, grantInputs, parseGrantForm, parsePercent } from './grant-form';

const fields = [
	{ id: 'f-nf', name: 'North Flat' },
	{ id: 'f-sh', name: 'Schoolhouse' },
	{ id: 'f-lh', name: 'Long Hill' }
];

function form(entries: [string, string][]) {
	const data = new FormData();
	for (const [k, v] of entries) data.append(k, v);
	return data;
}

describe('parsePercent', () => {
	it('reads percentages as people type them', () => {
		expect(parsePercent('25')).toBe(25);
		expect(parsePercent(' 33.3 ')).toBe(33.3);
		expect(parsePercent('33,3')).toBe(33.3);
		expect(parsePercent('25 %')).toBe(25);
		expect(parsePercent('0')).toBe(0);
		expect(parsePercent('100')).toBe(100);
	});
	it('is NaN for anything else', () => {
		for (const bad of ['', 'a third', '-5', '1e2', '25.', '1,000.5', '0x10']) expect(parsePercent(bad), bad).toBeNaN();
	});
});

describe('parseGrantForm', () => {
	it('turns ticked fields into grants: a crop share in percent, or cash rent (null)', () => {
		const out = parseGrantForm(
			form([
				[grantInputs.granted, 'f-nf'],
				[grantInputs.lease('f-nf'), 'share'],
				[grantInputs.share('f-nf'), '33.3'],
				[grantInputs.granted, 'f-lh'],
				[grantInputs.lease('f-lh'), 'cash'],
				[grantInputs.share('f-lh'), 'ignored under cash rent'],
				[grantInputs.lease('f-sh'), 'share'],
				[grantInputs.share('f-sh'), 'not ticked, so not checked']
			]),
			fields
		);
		expect(out).toMatchObject({ grants: [{ fieldId: 'f-nf', cropSharePercent: 33.3 }, { fieldId: 'f-lh', cropSharePercent: null }] });
	});

	it('names the field and the value when a share is out of range or not a number', () => {
		const out = parseGrantForm(
			form([
				[grantInputs.granted, 'f-nf'],
				[grantInputs.share('f-nf'), '120'],
				[grantInputs.granted, 'f-sh'],
				[grantInputs.share('f-sh'), 'half'],
				[grantInputs.granted, 'f-lh'],
				[grantInputs.share('f-lh'), '']
			]),
			fields
		);
		if (!('problems' in out)) throw new Error('expected problems');
		expect(out.problems.map((p) => p.message)).toEqual([
			'North Flat: the crop share must be a number from 0 to 100 percent; “120” is not.',
			'Schoolhouse: the crop share must be a number from 0 to 100 percent; “half” is not.',
			"Long Hill: give the landlord's crop share in percent (0 to 100), or choose cash rent."
		]);
		// What was typed comes back so the form can show it again.
		expect(out.values['f-sh']).toEqual({ granted: true, lease: 'share', share: 'half' });
	});

	it('refuses a field the farm does not hold', () => {
		const out = parseGrantForm(form([[grantInputs.granted, 'f-elsewhere'], [grantInputs.lease('f-elsewhere'), 'cash']]), fields);
		expect('problems' in out && out.problems[0].message).toMatch(/no longer in this farm/);
	});

	it('nothing ticked revokes everything', () => {
		expect(parseGrantForm(form([]), fields)).toMatchObject({ grants: [] });
	});
});

describe('grantChanges', () => {
	it('writes only what changed', () => {
		const stored = [
			{ fieldId: 'f-nf', cropSharePercent: 33.3 },
			{ fieldId: 'f-sh', cropSharePercent: 33.3 },
			{ fieldId: 'f-lh', cropSharePercent: null }
		];
		const wanted = [
			{ fieldId: 'f-nf', cropSharePercent: 33.3 },
			{ fieldId: 'f-lh', cropSharePercent: 25 },
			{ fieldId: 'f-new', cropSharePercent: null }
		];
		expect(grantChanges(stored, wanted)).toEqual({
			created: [{ fieldId: 'f-new', cropSharePercent: null }],
			changed: [{ fieldId: 'f-lh', from: null, to: 25 }],
			revoked: [{ fieldId: 'f-sh', cropSharePercent: 33.3 }]
		});
		expect(grantChanges(stored, stored)).toEqual({ created: [], changed: [], revoked: [] });
	});
});
