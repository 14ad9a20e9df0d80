/** A grid cell as the tiles and the cell API name it. */
export type CellRef = { field: string; col: number; row: number };
/** A cell feature's properties in the "cells" tile layer (see the map contract). */
/** `span` is the side of a block in cells below z15 (absent for single cells). */
export type CellProps = CellRef & { share: number; cover: number; hot: number; span?: number; change?: number; status?: number };
export type ColourBy = 'share' | 'change' | 'status';
/** The layers a click or hover on a cell hits. */
export const CELL_LAYERS = ['cells-fill', 'cells-hatch'];
