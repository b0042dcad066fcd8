export * from './age';
export * from './stock';
export * from './propose';
export * from './forecast';
export * from './policy';
export * from './load';
