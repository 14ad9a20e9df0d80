import { describe, expect, it } from 'vitest';
import { passwordResetMail } from './password-reset';

describe('passwordResetMail', () => {
	const mail = passwordResetMail({ name: 'Mara <Owen>', url: 'https://app.example/reset-password/abc_DEF-123', expiresInMinutes: 60 });

	it('gives the link, the expiry and what to do if you did not ask', () => {
		expect(mail.subject).toBe('Reset your Patchbook password');
		expect(mail.text).toContain('Choose a new password: https://app.example/reset-password/abc_DEF-123');
		expect(mail.text).toContain('expires in 1 hour');
		expect(mail.text).toContain('If you did not ask for this, ignore this message');
		expect(mail.html).toContain('href="https://app.example/reset-password/abc_DEF-123"');
	});

	it('escapes the name in the HTML part', () => {
		expect(mail.html).toContain('Hello Mara &lt;Owen&gt;,');
		expect(mail.text).toContain('Hello Mara <Owen>,');
	});

	it('says minutes when the expiry is not whole hours', () => {
		expect(passwordResetMail({ name: 'A', url: 'u', expiresInMinutes: 90 }).text).toContain('expires in 90 minutes');
		expect(passwordResetMail({ name: 'A', url: 'u', expiresInMinutes: 120 }).text).toContain('expires in 2 hours');
	});
});
