export * from './auth';
export * from './parts';
export * from './requests';
export * from './plans';
export * from './profiles';
export * from './jobs';
