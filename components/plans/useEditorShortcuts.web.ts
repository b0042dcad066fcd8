import { useEffect, useRef } from 'react';
import { actionForKey, type ShortcutHandlers } from './shortcuts';

function inEditableField(target: EventTarget | null): boolean {
  const el = target as HTMLElement | null;
  if (!el || typeof el.tagName !== 'string') return false;
  const tag = el.tagName.toLowerCase();
  return tag === 'input' || tag === 'textarea' || tag === 'select' || el.isContentEditable;
}

/** Listens on the window while the editor is open; returns true so the screen can show the help hint. */
export function useEditorShortcuts(handlers: ShortcutHandlers, enabled: boolean): boolean {
  const ref = useRef(handlers);
  ref.current = handlers;
  useEffect(() => {
    if (!enabled) return;
    const onKey = (e: KeyboardEvent) => {
      if (e.defaultPrevented || e.repeat) return;
      const action = actionForKey(e, inEditableField(e.target));
      if (!action) return;
      const run = ref.current[action];
      if (!run) return;
      e.preventDefault();
      run({ shift: e.shiftKey });
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [enabled]);
  return true;
}
