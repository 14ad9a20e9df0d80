// File names and headers for zone downloads.

/** A name as a file-name part: lower case, letters and digits joined by hyphens. */
export function fileSlug(name: string): string {
	return (
		name
			.normalize('NFKD')
			.replace(/[\u0300-\u036f]/g, '')
			.toLowerCase()
			.replace(/[^a-z0-9]+/g, '-')
			.replace(/^-+|-+$/g, '') || 'field'
	);
}

export function attachment(fileName: string, type: string) {
	return {
		'content-type': type,
		'content-disposition': `attachment; filename="${fileName}"`,
		'cache-control': 'private, no-store'
	};
}
