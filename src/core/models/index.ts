/** Device models (design §3): square law and simplified EKV, temperature and λ(L). */
export { thermalVoltage, thresholdAt, kpAt, lambdaAt } from './thermal';
export { prepareDevice, deviceProblem, type ModelDevice, type DeviceSizeLike, type ProcessConditions } from './device';
export { squareLaw, ekv, evalChannel, newChannelEval, type ChannelEval } from './core';
export { evalFrame, evalTerminal } from './terminal';
export { evalDevice, evalPrepared, gateDriveFor, inversionOf, type DeviceEvaluation } from './evaluate';
