// The app's colours for maps and server-drawn images, as in src/routes/layout.css (which holds the
// palette for the markup). Plain values, so pure modules and the PDF writer can use them.

export const colors = {
	paper: '#f7f5f0',
	ink: '#1d2527',
	line: '#d9d5cb',
	loam300: '#8fb1b8',
	loam500: '#3f6f79',
	loam700: '#27444b',
	straw500: '#c9a047',
	bark700: '#5b3518',
	loam900: '#162a2f',
	alert700: '#9a2e1c'
};
