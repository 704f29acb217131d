/** Variation and sizing: corners, Monte Carlo mismatch, design-target sizing and their findings. */
export { applyCorner, runCorners } from './corners';
export { runMonteCarlo, type MonteCarloOptions } from './montecarlo';
export { variationFindings } from './findings';
export { Xoshiro128 } from './prng';
export { applyDesignTargets, type SizedDevice } from '../design/auto-size';
export { attachVariation, type VariationOptions } from './attach';
