import { describe, expect, it } from 'vitest';
import { expiryWords, invitationMail } from './invitation';

describe('invitationMail', () => {
	const at = new Date('2026-12-09T04:40:00Z');
	const mail = invitationMail({
		farmName: 'Tallowgrass & Sons',
		role: 'agronomist',
		inviterName: 'Mara Quill',
		expiresAt: at,
		timeZone: 'America/Chicago',
		url: 'http://127.0.0.1:3000/invite/AbC_-9'
	});

	it('names farm, role, inviter, expiry and the link in the text part', () => {
		expect(mail.subject).toBe('Mara Quill invited you to Tallowgrass & Sons on Patchbook');
		expect(mail.text).toContain('Mara Quill invited you to join Tallowgrass & Sons on Patchbook as an agronomist');
		// 04:40 UTC is 22:40 the evening before in Chicago (UTC-6 in December).
		expect(mail.text).toContain('until Tuesday 8 December 2026, 22:40 (America/Chicago)');
		expect(mail.text).toContain('Accept the invitation: http://127.0.0.1:3000/invite/AbC_-9');
	});

	it('escapes the farm name in the HTML part', () => {
		expect(mail.html).toContain('Tallowgrass &amp; Sons');
		expect(mail.html).toContain('href="http://127.0.0.1:3000/invite/AbC_-9"');
	});

	it('writes the expiry on the farm clock', () => {
		expect(expiryWords(at, 'UTC')).toBe('Wednesday 9 December 2026, 04:40 (UTC)');
		expect(expiryWords(at, 'Europe/Dublin')).toBe('Wednesday 9 December 2026, 04:40 (Europe/Dublin)');
	});
});
