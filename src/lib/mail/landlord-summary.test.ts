import { describe, expect, it } from 'vitest';
import { landlordSummaryMail } from './landlord-summary';

const base = {
	landlordName: 'Helen Marsh',
	farmName: 'Tallowgrass Farm',
	managerName: 'Mara Lindqvist',
	season: 2026,
	fieldNames: ['North Flat', 'Schoolhouse', 'Long Hill'],
	url: 'https://patchbook.example/tallowgrass/summaries?season=2026'
};

describe('landlordSummaryMail', () => {
	it('names the season, the farm and the fields, and links to the summary', () => {
		const m = landlordSummaryMail(base);
		expect(m.subject).toBe('Season summary 2026 from Tallowgrass Farm');
		expect(m.text).toContain('Hello Helen Marsh,');
		expect(m.text).toContain('your fields North Flat, Schoolhouse and Long Hill.');
		expect(m.text).toContain(`Open the season summary: ${base.url}`);
		expect(m.html).toContain(`href="${base.url.replace(/&/g, '&amp;')}"`);
	});

	it('holds no number but the season and the ones in the link', () => {
		const m = landlordSummaryMail(base);
		const withoutLink = m.text.replaceAll(base.url, '');
		expect(withoutLink.match(/\d[\d.,]*/g)).toEqual(['2026']);
		expect(m.text).not.toMatch(/%|\$|ha\b|ac\b|L\b/);
	});

	it('says so when no field is shared', () => {
		expect(landlordSummaryMail({ ...base, fieldNames: [] }).text).toContain('No field is shared with you');
		expect(landlordSummaryMail({ ...base, fieldNames: ['North Flat'] }).text).toContain('your field North Flat.');
	});
});
