/** Largest accepted side and cell count: beyond these a header is taken as damaged or hostile. */
export const MAX_SIDE_CELLS = 1_000_000;
export const MAX_CELLS = 2 ** 31;
