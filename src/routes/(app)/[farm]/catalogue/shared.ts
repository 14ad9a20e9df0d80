// What the catalogue's forms share on the page: the action result's shape and what to do after
// a submit.
import { applyAction } from '$app/forms';
import { goto } from '$app/navigation';
import { page } from '$app/state';
import type { SubmitFunction } from '@sveltejs/kit';

export type Section = 'machines' | 'products' | 'mixes';

/** Any catalogue action's answer: saved (with warnings) or refused (with values and problems). */
export type FormResult =
	| {
			section?: Section;
			form?: string;
			saved?: string;
			warnings?: string[];
			message?: string;
			values?: Record<string, string | string[]>;
			problems?: Record<string, string>;
	  }
	| null
	| undefined;

/** The typed values and problems when `result` answers the form called `key`. */
export function answerFor(result: FormResult, key: string) {
	const mine = result?.form === key && !result.saved;
	return {
		values: mine ? (result?.values ?? null) : null,
		problems: mine ? (result?.problems ?? {}) : {},
		message: mine ? result?.message : undefined
	};
}

/** A single value typed earlier, or the fallback. */
export function typed(values: Record<string, string | string[]> | null, name: string, fallback: string): string {
	const v = values?.[name];
	return typeof v === 'string' ? v : fallback;
}

/**
 * After a save or delete, close the edit or confirm panel (it lives in the URL) and show the
 * answer; a refusal stays in place with its messages.
 */
export const closeOnSuccess: SubmitFunction = () => {
	return async ({ result, update }) => {
		if (result.type === 'success' && page.url.search) {
			await goto(`${page.url.pathname}${page.url.hash}`, { noScroll: true, keepFocus: true, invalidateAll: true });
			await applyAction(result);
		} else {
			await update();
		}
	};
};
