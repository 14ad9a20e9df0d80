export * from './auth';
export * from './farms';
export * from './fields';
export * from './audit';
