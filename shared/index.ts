export * from './errors';
export * from './cautions';
export * from './schemas/auth';
export * from './schemas/common';
export * from './schemas/records';
export * from './schemas/packet';
export * from './schemas/sync';
export * from './schemas/completions';
