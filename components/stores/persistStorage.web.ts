import type { StateStorage } from 'zustand/middleware';

/** The browser keeps the current lab across reloads; private modes may refuse storage. */
export const persistStorage: StateStorage = {
  getItem: (name) => {
    try {
      return globalThis.localStorage?.getItem(name) ?? null;
    } catch {
      return null;
    }
  },
  setItem: (name, value) => {
    try {
      globalThis.localStorage?.setItem(name, value);
    } catch {
      // Storage full or blocked: the choice lasts for this page only.
    }
  },
  removeItem: (name) => {
    try {
      globalThis.localStorage?.removeItem(name);
    } catch {
      // Nothing to clean up when storage is blocked.
    }
  },
};
