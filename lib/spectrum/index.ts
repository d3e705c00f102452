export * from './types';
export * from './sniff';
export * from './parse';
export * from './peaks';
export * from './plot';
export * from './synthesize';
export * from './jcamp-write';
export * from './random';
