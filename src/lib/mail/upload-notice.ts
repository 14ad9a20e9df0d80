// The words of the mail sent when an upload has been processed or has failed. Pure: figures
// come in SI (m2) and are written in the reader's own units.
import { formatArea, formatNumber, type UnitSystem } from '$lib/format';
import { composeMail, type MailParts } from './compose';

export type UploadNoticeWords = {
	name: string;
	farmName: string;
	fileName: string;
	/** Why this person gets it: their own upload, or a farm they manage. */
	reason: 'uploader' | 'manager';
	/** The upload's page. */
	url: string;
	/** Where to switch these messages off. */
	settingsUrl: string;
	units: UnitSystem;
};

export type UploadTotals = { fields: string[]; days: string[]; coveredM2: number; sprayedM2: number };

/** One line: fields and days, covered and sprayed area, sprayed share of covered. */
export function figuresLine(t: UploadTotals, units: UnitSystem): string {
	if (t.fields.length === 0) return 'No fix fell inside a field on the chosen days, so nothing was counted.';
	const share = t.coveredM2 > 0 ? ` (${formatNumber((100 * t.sprayedM2) / t.coveredM2, 3, 1)} % of the area covered)` : '';
	const days = t.days.length === 1 ? `on ${t.days[0]}` : `on ${t.days.length} days, ${t.days[0]} to ${t.days[t.days.length - 1]}`;
	return `${t.fields.join(', ')} ${days}: ${formatArea(t.coveredM2, units)} covered, ${formatArea(t.sprayedM2, units)} sprayed${share}.`;
}

function footnote(w: UploadNoticeWords): string[] {
	const why = w.reason === 'uploader' ? 'You get this because you uploaded the log.' : `You get this because you manage ${w.farmName}.`;
	return [`${why} To stop these messages, untick "Mail me about processed uploads" on your account page: ${w.settingsUrl}`];
}

export function uploadDoneMail(w: UploadNoticeWords, totals: UploadTotals): MailParts & { subject: string } {
	return {
		subject: `Processed: ${w.fileName}`,
		...composeMail({
			greeting: `Hello ${w.name},`,
			paragraphs: [`The log ${w.fileName} in ${w.farmName} has been processed.`, figuresLine(totals, w.units)],
			action: { label: 'Open the upload', url: w.url },
			footnote: footnote(w)
		})
	};
}

export function uploadFailedMail(w: UploadNoticeWords, error: string): MailParts & { subject: string } {
	return {
		subject: `Could not process: ${w.fileName}`,
		...composeMail({
			greeting: `Hello ${w.name},`,
			paragraphs: [`The log ${w.fileName} in ${w.farmName} could not be processed. Nothing from it was counted.`, error],
			action: { label: 'Open the upload', url: w.url },
			footnote: footnote(w)
		})
	};
}
