/**
 * Rounding of computed sizes so the number written into the spec is the number that was
 * checked: onto `process.grid` when the process has one, else to four significant digits.
 */

export type SnapMode = 'nearest' | 'up';

/** Snap a length (m) to the grid, or to 4 significant digits without a grid. `up` never
 *  returns less than the input (used where a larger value keeps a requirement, e.g. L for Rout). */
export function snapLength(x: number, grid: number | undefined, mode: SnapMode = 'nearest'): number {
  if (!(x > 0) || !Number.isFinite(x)) return x;
  if (grid !== undefined && grid > 0) {
    const k = x / grid;
    // Guard against k = 12.000000000001 rounding up a whole grid step.
    const steps = mode === 'up' ? Math.ceil(k - 1e-9) : Math.round(k);
    return cleanFloat(Math.max(1, steps) * grid);
  }
  const e = Math.floor(Math.log10(x)) - 3;
  const unit = Math.pow(10, e);
  const k = x / unit;
  const steps = mode === 'up' ? Math.ceil(k - 1e-9) : Math.round(k);
  return cleanFloat(steps * unit);
}

/** Strip binary noise (1.2000000000000002e-6 → 1.2e-6) so the value prints as it reads. */
export function cleanFloat(x: number): number {
  return Number(x.toPrecision(12));
}
