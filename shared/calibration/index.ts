export * from './calibrate';
export * from './runs';
