export * from './auth';
export * from './farms';
export * from './fields';
export * from './audit';
export * from './catalogue';
export * from './uploads';
export * from './results';
export * from './map-tiles';
