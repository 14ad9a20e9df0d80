// The words of the mail a manager sends a landlord when a season summary is ready. On purpose it
// carries no figures, no field other than by name and no money: the figures sit behind sign-in,
// where the landlord sees only their granted fields, so a forwarded or misdelivered mail gives
// nothing away.
import { composeMail, type MailParts } from './compose';

export type LandlordSummaryMail = {
	landlordName: string;
	farmName: string;
	managerName: string;
	season: number;
	/** The landlord's granted fields, by name. */
	fieldNames: string[];
	/** `${origin}/<farm>/summaries?season=<season>`: opens after sign-in. */
	url: string;
};

export function landlordSummaryMail(m: LandlordSummaryMail): MailParts & { subject: string } {
	const fields =
		m.fieldNames.length === 0
			? 'No field is shared with you at the moment; the link will show you as soon as one is.'
			: `It covers ${m.fieldNames.length === 1 ? 'your field' : 'your fields'} ${listOf(m.fieldNames)}.`;
	return {
		subject: `Season summary ${m.season} from ${m.farmName}`,
		...composeMail({
			greeting: `Hello ${m.landlordName},`,
			paragraphs: [
				`${m.managerName} of ${m.farmName} has shared the ${m.season} season summary with you in Patchbook. ${fields}`,
				'Sign in to read it, print it or download it as a PDF. The figures are kept in Patchbook and are not written in this message.'
			],
			action: { label: 'Open the season summary', url: m.url },
			footnote: [`You get this message because you are a landlord of ${m.farmName} in Patchbook.`]
		})
	};
}

function listOf(names: string[]): string {
	if (names.length <= 2) return names.join(' and ');
	return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}
