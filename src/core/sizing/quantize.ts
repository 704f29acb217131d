/**
 * The one rounding rule for computed sizes, used by design targets (`size: auto`, sized at
 * resolve time) and by fixes (solved afterwards) alike, so the number written into the spec is
 * the number that was checked: onto `process.grid` when given (never below one step), else
 * three significant digits so the file stays readable. The direction is chosen by the caller so
 * that rounding keeps the requirement (a width that must grow, a length kept for Rout, round up).
 */

export type RoundDirection = 'up' | 'down' | 'nearest';

/** Significant digits of a computed size without a grid. */
const SIZE_DIGITS = 3;

/** Round `value` to a multiple of `grid` (m), never below one grid step. */
export function snapToGrid(value: number, grid: number, direction: RoundDirection): number {
  const steps = value / grid;
  // Tolerate floating-point noise so an on-grid value stays put (3.4u / 10n = 339.99999…).
  const near = Math.round(steps);
  let n: number;
  if (Math.abs(steps - near) < 1e-6) n = near;
  else if (direction === 'up') n = Math.ceil(steps);
  else if (direction === 'down') n = Math.floor(steps);
  else n = near;
  return cleanDecimal(Math.max(n, 1) * grid);
}

/** Round to `digits` significant decimal digits in the given direction. */
export function roundSignificant(value: number, digits: number, direction: RoundDirection): number {
  if (value === 0 || !Number.isFinite(value)) return value;
  const exponent = Math.floor(Math.log10(Math.abs(value))) - digits + 1;
  const scale = Math.pow(10, exponent);
  const steps = value / scale;
  const near = Math.round(steps);
  let n: number;
  if (Math.abs(steps - near) < 1e-9 * Math.abs(steps)) n = near;
  else if (direction === 'up') n = Math.ceil(steps);
  else if (direction === 'down') n = Math.floor(steps);
  else n = near;
  return cleanDecimal(n * scale);
}

/** A size the fix will write: on the grid if there is one, else to `digits` significant digits. */
export function quantizeSize(value: number, grid: number | undefined, direction: RoundDirection): number {
  if (!(value > 0) || !Number.isFinite(value)) return value;
  return grid !== undefined && grid > 0 ? snapToGrid(value, grid, direction) : roundSignificant(value, SIZE_DIGITS, direction);
}

/** Drop binary noise (3.4000000000000003e-6 → 3.4e-6) without moving the value by more than 1e-12 relative. */
function cleanDecimal(value: number): number {
  return Number(value.toPrecision(12));
}
