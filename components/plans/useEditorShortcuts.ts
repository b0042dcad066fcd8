import type { ShortcutHandlers } from './shortcuts';

/** Phones and tablets without a keyboard: the editor's buttons do everything. */
export function useEditorShortcuts(_handlers: ShortcutHandlers, _enabled: boolean): boolean {
  return false;
}
