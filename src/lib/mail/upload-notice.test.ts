import { describe, expect, it } from 'vitest';
import { figuresLine, uploadDoneMail, uploadFailedMail, type UploadNoticeWords } from './upload-notice';

const words: UploadNoticeWords = {
	name: 'Sam',
	farmName: 'Tallowgrass',
	fileName: 'north-flat.csv',
	reason: 'uploader',
	url: 'https://app.example/tallowgrass/uploads/1',
	settingsUrl: 'https://app.example/account',
	units: 'metric'
};

describe('upload notices', () => {
	it('writes the figures in one line, in the reader\'s units', () => {
		// 40,468.564224 m2 = 10 ac exactly (NIST SP 811: 1 ac = 4,046.8564224 m2); half sprayed.
		const totals = { fields: ['North Flat'], days: ['2026-05-04'], coveredM2: 40_468.564224, sprayedM2: 20_234.282112 };
		expect(figuresLine(totals, 'metric')).toBe('North Flat on 2026-05-04: 4.047 ha covered, 2.023 ha sprayed (50 % of the area covered).');
		expect(figuresLine(totals, 'us')).toBe('North Flat on 2026-05-04: 10 ac covered, 5 ac sprayed (50 % of the area covered).');
		expect(figuresLine({ fields: ['A', 'B'], days: ['2026-05-04', '2026-05-06'], coveredM2: 1e4, sprayedM2: 1234 }, 'metric')).toBe(
			'A, B on 2 days, 2026-05-04 to 2026-05-06: 1 ha covered, 0.1234 ha sprayed (12.3 % of the area covered).'
		);
		expect(figuresLine({ fields: [], days: [], coveredM2: 0, sprayedM2: 0 }, 'metric')).toMatch(/nothing was counted/);
	});

	it('a done mail carries file, figures, link and how to stop them', () => {
		const mail = uploadDoneMail(words, { fields: ['North Flat'], days: ['2026-05-04'], coveredM2: 1e4, sprayedM2: 5e3 });
		expect(mail.subject).toBe('Processed: north-flat.csv');
		expect(mail.text).toContain('North Flat on 2026-05-04: 1 ha covered, 0.5 ha sprayed (50 % of the area covered).');
		expect(mail.text).toContain('Open the upload: https://app.example/tallowgrass/uploads/1');
		expect(mail.text).toContain('because you uploaded the log');
		expect(mail.text).toContain('https://app.example/account');
	});

	it('a failed mail carries the error sentence; managers are told why they get it', () => {
		const mail = uploadFailedMail({ ...words, reason: 'manager' }, 'north-flat.csv, row 12, column lat: "x" is not a number.');
		expect(mail.subject).toBe('Could not process: north-flat.csv');
		expect(mail.text).toContain('north-flat.csv, row 12, column lat: "x" is not a number.');
		expect(mail.text).toContain('because you manage Tallowgrass');
	});
});
