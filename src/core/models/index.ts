/** Device models (design §3): the model interface, its implementations by name, temperature
 *  and λ(L), and one-device evaluation. */
export { thermalVoltage, thresholdAt, kpAt, lambdaAt } from './thermal';
export { prepareDevice, deviceProblem, type ModelDevice, type DeviceSizeLike, type ProcessConditions } from './device';
export { newChannelEval, type ChannelEval } from './core';
export type { DeviceModel, SizingContext } from './model';
export { MODELS, MODEL_NAMES } from './registry';
export { evalFrame, evalTerminal } from './terminal';
export { evalDevice, evalPrepared, gateDriveFor, inversionOf, type DeviceEvaluation } from './evaluate';
