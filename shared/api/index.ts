export * from './errors';
export * from './types';
export * from './schemas';
