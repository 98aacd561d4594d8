/**
 * The bounds that keep one file or one argument from hurting the process: every curve, grid and
 * window the module builds is sized from these, so no input can make it loop or allocate without end.
 */

/**
 * Highest engine speed a pull point may have, rpm. The fastest-revving piston engines raced run
 * to about 20,000 rpm; 25,000 leaves room above them and still refuses a mistyped or hostile
 * figure (our own bound).
 */
export const RPM_CEILING = 25_000

/**
 * Largest power (hp) or torque (lb·ft) a pull point may have: several times the most powerful
 * piston engines raced (our own bound). Keeps every sum over a pull far from overflow.
 */
export const FIGURE_CEILING = 100_000

/** Most points an rpm grid may hold (resample, deltaCurve, rpmGrid): a 0.25 rpm step over the whole ceiling. */
export const MAX_GRID_POINTS = 100_000

/**
 * Most data rows a pull file may hold. A dyno logs a sweep at a few hundred samples a second at
 * most, over tens of seconds: 20,000 rows is several times the longest real pull.
 */
export const PULL_MAX_ROWS = 20_000

/** Lines above the header a pull file may carry (a title, the shop's notes), skipped by the parser. */
export const PULL_MAX_PREAMBLE_ROWS = 30
