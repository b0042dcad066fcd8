export * from './cautions';
export * from './checklist';
export * from './timers';
export * from './card';
export * from './readings';
export * from './order';
