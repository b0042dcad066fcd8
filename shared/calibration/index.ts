export * from './calibrate';
export * from './runs';
export * from './readings';
