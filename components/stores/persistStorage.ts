import type { StateStorage } from 'zustand/middleware';

/** Off the web the current lab lives for the session only. */
const memory = new Map<string, string>();
export const persistStorage: StateStorage = {
  getItem: (name) => memory.get(name) ?? null,
  setItem: (name, value) => void memory.set(name, value),
  removeItem: (name) => void memory.delete(name),
};
