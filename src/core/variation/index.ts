/** Variation and sizing: corners, Monte Carlo mismatch, design-target sizing and their findings. */
export { type MonteCarloOptions } from './montecarlo';
export { variationFindings } from './findings';
export { applyDesignTargets, type SizedDevice } from '../design/auto-size';
export { attachVariation, type VariationOptions } from './attach';
