import { describe, expect, it } from 'vitest';
import { composeMail } from './compose';

describe('composeMail', () => {
	const parts = composeMail({
		greeting: 'Hello Helen,',
		paragraphs: ['Mara invited you to <Tallowgrass> & friends.'],
		action: { label: 'Accept the invitation', url: 'http://127.0.0.1:3000/invite/abc?x=1&y=2' },
		footnote: ['The link works once and expires in 7 days.']
	});

	it('the text part carries every paragraph and the bare link', () => {
		expect(parts.text).toContain('Hello Helen,\n\nMara invited you to <Tallowgrass> & friends.\n');
		expect(parts.text).toContain('Accept the invitation: http://127.0.0.1:3000/invite/abc?x=1&y=2');
		expect(parts.text).toContain('--\nThe link works once and expires in 7 days.');
	});

	it('the HTML part escapes what it quotes, in text and in the link', () => {
		expect(parts.html).toContain('Mara invited you to &lt;Tallowgrass&gt; &amp; friends.');
		expect(parts.html).not.toContain('<Tallowgrass>');
		expect(parts.html).toContain('href="http://127.0.0.1:3000/invite/abc?x=1&amp;y=2"');
	});
});
