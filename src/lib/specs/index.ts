export * from './check-release';
export { buildFindingKey } from './finding';
export { CD_FRAMES_PER_SECOND, snapSecondsToCdFrames } from './layout-rules';
export * from './normalization';
export * from './profiles';
export * from './rule-titles';
export * from './schema';
export * from './types';
export * from './vinyl';
