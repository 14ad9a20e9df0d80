// The offline base style: paper background and Noto Sans served by the app itself. MapLibre 6
// draws glyphs from these font files in the browser (`font-faces`), so no glyph server and no
// request leaves the app (see /work/shared/mapstack.md, labels option A).
import type { StyleSpecification } from 'maplibre-gl';
import latin from '@fontsource/noto-sans/files/noto-sans-latin-400-normal.woff2?url';
import latinExt from '@fontsource/noto-sans/files/noto-sans-latin-ext-400-normal.woff2?url';
import latin600 from '@fontsource/noto-sans/files/noto-sans-latin-600-normal.woff2?url';
import { colors } from '$lib/map/palette';

export { colors };

export const FONT = 'Noto Sans Regular';
export const FONT_BOLD = 'Noto Sans SemiBold';

// Unicode ranges as @fontsource/noto-sans 5.3.0 declares them in 400.css.
const latinRange = ['U+0000-00FF', 'U+0131', 'U+0152-0153', 'U+02BB-02BC', 'U+02C6', 'U+02DA', 'U+02DC', 'U+0304', 'U+0308', 'U+0329', 'U+2000-206F', 'U+20AC', 'U+2122', 'U+2191', 'U+2193', 'U+2212', 'U+2215', 'U+FEFF', 'U+FFFD'];
const latinExtRange = ['U+0100-02BA', 'U+02BD-02C5', 'U+02C7-02CC', 'U+02CE-02D7', 'U+02DD-02FF', 'U+1D00-1DBF', 'U+1E00-1E9F', 'U+1EF2-1EFF', 'U+2020', 'U+20A0-20AB', 'U+20AD-20C0', 'U+2113', 'U+2C60-2C7F', 'U+A720-A7FF'];

export function baseStyle(): StyleSpecification {
	return {
		version: 8,
		'font-faces': {
			[FONT]: [
				{ url: latin, 'unicode-range': latinRange },
				{ url: latinExt, 'unicode-range': latinExtRange }
			],
			[FONT_BOLD]: [{ url: latin600, 'unicode-range': latinRange }]
		},
		sources: {},
		layers: [{ id: 'paper', type: 'background', paint: { 'background-color': colors.paper } }]
	};
}
