/** Circuit elaboration, the Newton DC solver and the small-signal analysis. */
export { CircuitBuilder, type Circuit, type MosInstance } from './circuit';
export type { CircuitElement, DeviceElement, MosElement, ResistorElement, CurrentSourceElement, VoltageSourceElement } from './elements/element';
export { Workspace } from './workspace';
export { assemble } from './assemble';
export { solveDc, type DcOptions, type DcResult } from './newton';
export { factorAtSolution, outputAdjoint, outputConductance, outputSensitivities, heldNodeResponse, type Sensitivities } from './smallSignal';
export { buildTemplate, idealRatio, isBank, type PerturbationLike } from './templates';
export { buildNetlist, railName } from './netlistCircuit';
export type { MirrorCircuit } from './mirrorCircuit';
