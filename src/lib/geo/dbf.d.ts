// dbf 0.2.0 ships no types; the one entry point used here (src/structure.js).
declare module 'dbf' {
	export type DbfFieldMeta = { name: string; type: 'C' | 'N' | 'L' | 'D'; size: number };
	/** A dBase III table of `rows`, columns as `meta` says (else guessed from the values). */
	export function structure(rows: Record<string, unknown>[], meta?: DbfFieldMeta[]): DataView;
	const dbf: { structure: typeof structure };
	export default dbf;
}
