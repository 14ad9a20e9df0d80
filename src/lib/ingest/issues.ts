// Problems found while reading an upload, in a shape the upload screen can list and point at.

/** One problem in an uploaded file. `row` is 1-based as a spreadsheet shows it (the header is
 * row 1 of a CSV; for GeoJSON and shapefiles it is the feature number); null when the problem
 * is the file as a whole. */
export type IngestIssue = {
	file: string;
	row: number | null;
	column: string | null;
	message: string;
};

/** Thrown by the readers for a file that cannot be read at all; callers show `issue`. */
export class IngestError extends Error {
	readonly issue: IngestIssue;
	constructor(file: string, message: string, where: { row?: number | null; column?: string | null } = {}) {
		super(formatIssue({ file, row: where.row ?? null, column: where.column ?? null, message }));
		this.name = 'IngestError';
		this.issue = { file, row: where.row ?? null, column: where.column ?? null, message };
	}
}

/** "field.csv, row 12, column 'Lat': not a number". */
export function formatIssue(issue: IngestIssue): string {
	const where = [issue.file];
	if (issue.row !== null) where.push(`row ${issue.row}`);
	if (issue.column !== null) where.push(`column '${issue.column}'`);
	return `${where.join(', ')}: ${issue.message}`;
}

/** Turns anything a reader threw into an issue naming the file, so no exception leaks raw. */
export function toIssue(file: string, err: unknown): IngestIssue {
	if (err instanceof IngestError) return err.issue;
	const message = err instanceof Error ? err.message : String(err);
	return { file, row: null, column: null, message: `could not be read: ${message}` };
}
