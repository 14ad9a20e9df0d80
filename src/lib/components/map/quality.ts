// Colours and words of the quality layer, shared by the layer and its legend (palette colours only).
import { colors } from './style';

export const qualityKinds = [
	{ kind: 'speed', label: 'Too fast', colour: colors.alert700 },
	{ kind: 'height', label: 'Boom height out of band', colour: colors.loam500 },
	{ kind: 'pressure', label: 'Pressure out of range', colour: colors.loam900 },
	{ kind: 'several', label: 'More than one of these', colour: colors.bark700 },
	{ kind: 'gap', label: 'Gap in the log', colour: colors.ink }
] as const;

export const qualityColour = (kind: (typeof qualityKinds)[number]['kind']) => qualityKinds.find((k) => k.kind === kind)!.colour;
