/** Device models (design §3): the model interface, its implementations by name, temperature
 *  and λ(L), and one-device evaluation. */
export { thermalVoltage } from './thermal';
export { prepareDevice, type ModelDevice, type DeviceSizeLike, type ProcessConditions } from './device';
export { type ChannelEval } from './core';
export type { DeviceModel, SizingContext } from './model';
export { evalDevice, gateDriveFor, inversionOf, type DeviceEvaluation } from './evaluate';
