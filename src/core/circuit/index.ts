/** Circuit elaboration, the Newton DC solver and the small-signal analysis. */
export { CircuitBuilder, type Circuit, type MosInstance, type CurrentSourceInstance, type ResistorInstance } from './circuit';
export { Workspace, assemble } from './assemble';
export { luFactor, luSolve, luSolveTranspose } from './lu';
export { solveDc, type DcOptions, type DcResult } from './newton';
export { factorAtSolution, outputAdjoint, outputConductance, outputSensitivities, heldNodeResponse, type Sensitivities } from './smallSignal';
export { buildTemplate, idealRatio, isBank, type PerturbationLike } from './templates';
export { buildNetlist, railName } from './netlistCircuit';
export type { MirrorCircuit } from './mirrorCircuit';
