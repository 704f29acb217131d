/** Solvers that compute the size meeting a target, on modified copies of a resolved spec. Pure. */
export * from './devices';
export * from './root';
export * from './quantize';
export * from './token-style';
export * from './ratio';
export * from './scale';
export * from './vbias';
export * from './balance';
