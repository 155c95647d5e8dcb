export * from './errors';
export * from './schemas/auth';
export * from './cautions';
