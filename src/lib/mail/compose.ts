// A message's two parts from the same words: plain text for every mail reader, and simple HTML
// (inline styles only, since mail readers drop style sheets). Pure; each kind of message builds
// its words in its own module and passes them here.

export type MailContent = {
	/** The first line, e.g. 'Hello Helen,'. */
	greeting?: string;
	/** Paragraphs of plain text; never HTML. */
	paragraphs: string[];
	/** One button in the HTML and a bare link in the text. */
	action?: { label: string; url: string };
	/** Small print under the rest: why the reader got this, how to stop it. */
	footnote?: string[];
};

export type MailParts = { text: string; html: string };

const htmlEscapes: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };
export const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => htmlEscapes[c]);

// The app's own colours (src/routes/layout.css): loam for the button, ink for the words.
const ink = '#1d2527';
const loam = '#27444b';
const muted = '#5e6a6d';

export function composeMail(content: MailContent): MailParts {
	const text = [
		...(content.greeting ? [content.greeting, ''] : []),
		...content.paragraphs.flatMap((p) => [p, '']),
		...(content.action ? [`${content.action.label}: ${content.action.url}`, ''] : []),
		...(content.footnote?.length ? ['--', ...content.footnote] : []),
		'Patchbook'
	].join('\n');

	const p = (s: string, style = '') => `<p style="margin:0 0 14px;${style}">${escapeHtml(s)}</p>`;
	const html = [
		'<!doctype html><html><body style="margin:0;padding:24px;background:#f7f5f0">',
		`<div style="max-width:560px;margin:0 auto;background:#ffffff;border:1px solid #d9d5cb;border-radius:8px;padding:24px;font-family:'Noto Sans',Arial,sans-serif;font-size:15px;line-height:1.5;color:${ink}">`,
		content.greeting ? p(content.greeting) : '',
		...content.paragraphs.map((x) => p(x)),
		content.action
			? `<p style="margin:20px 0"><a href="${escapeHtml(content.action.url)}" style="display:inline-block;background:${loam};color:#ffffff;text-decoration:none;font-weight:600;padding:10px 18px;border-radius:6px">${escapeHtml(content.action.label)}</a></p>` +
				p(`Or open this address: ${content.action.url}`, `font-size:13px;color:${muted};word-break:break-all`)
			: '',
		...(content.footnote ?? []).map((x) => p(x, `font-size:13px;color:${muted}`)),
		`<p style="margin:16px 0 0;font-size:13px;color:${muted}">Patchbook</p>`,
		'</div></body></html>'
	].join('');
	return { text, html };
}
