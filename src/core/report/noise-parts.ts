/**
 * Which elements' parts a noise plot draws. A part a thousand times below the lowest total density
 * carries under a millionth of the noise power at every frequency: drawn on a log axis it only
 * stretches the axis down to 1e-19 and buries the parts that matter, so it is left off (the
 * report's shares still list every element).
 */
export const NOISE_PART_FLOOR = 1e-3;

export function visibleNoiseParts(spectrum: { total: readonly number[]; parts: Readonly<Record<string, readonly number[]>> }): [string, readonly number[]][] {
  const lowest = Math.min(...spectrum.total.filter((v) => v > 0 && Number.isFinite(v)));
  if (!Number.isFinite(lowest)) return [];
  const floor = lowest * NOISE_PART_FLOOR;
  return Object.entries(spectrum.parts).filter(([, ys]) => ys.some((v) => v >= floor));
}
