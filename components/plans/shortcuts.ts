/** The editor's keyboard shortcuts on the web, as the help sheet lists them. */
export type ShortcutAction = 'pack' | 'cancel' | 'save' | 'keep' | 'fit' | 'frame' | 'top' | 'front' | 'side' | 'layerUp' | 'layerDown' | 'moveLeft' | 'moveRight' | 'moveBack' | 'moveFront' | 'turn' | 'drop' | 'undo' | 'help';

export const SHORTCUTS: { keys: string[]; action: ShortcutAction; label: string }[] = [
  { keys: ['P'], action: 'pack', label: 'Pack the plan (again) with the packing options' },
  { keys: ['Esc'], action: 'cancel', label: 'Stop packing and keep the best layout so far; close a sheet' },
  { keys: ['S', 'Ctrl S'], action: 'save', label: 'Save the plan' },
  { keys: ['K'], action: 'keep', label: 'Keep the layout being shown as a new layout' },
  { keys: ['0', 'F'], action: 'fit', label: 'Three-quarter view of the parts (or of the chamber when it is framed)' },
  { keys: ['C'], action: 'frame', label: 'Frame the whole chamber, or the parts again' },
  { keys: ['1'], action: 'top', label: 'Look down the build direction' },
  { keys: ['2'], action: 'front', label: 'Look at the chamber from the front' },
  { keys: ['3'], action: 'side', label: 'Look at the chamber from the side' },
  { keys: ['[', ']'], action: 'layerDown', label: 'Move the cut one layer down or up (Shift: ten)' },
  { keys: ['←', '→', '↑', '↓'], action: 'moveLeft', label: 'Move the marked parts 5 mm across the plate at their height (Shift: 1 mm)' },
  { keys: ['R'], action: 'turn', label: 'Turn the marked parts a quarter turn about the build direction' },
  { keys: ['D'], action: 'drop', label: 'Drop the marked parts to the lowest height where they keep the spacing' },
  { keys: ['Ctrl Z'], action: 'undo', label: 'Take back the last move, turn, drop or removal by hand (a drag counts once)' },
  { keys: ['?'], action: 'help', label: 'Show or hide this sheet' },
];

export type ShortcutHandlers = Partial<Record<ShortcutAction, (opts: { shift: boolean }) => void>>;

/** The action for a key press, or null; typing in a field never triggers one (except Ctrl/Cmd S). */
export function actionForKey(e: { key: string; ctrlKey?: boolean; metaKey?: boolean; altKey?: boolean; shiftKey?: boolean }, inField: boolean): ShortcutAction | null {
  const mod = !!(e.ctrlKey || e.metaKey);
  if (mod && e.key.toLowerCase() === 's') return 'save';
  // In a text field Ctrl Z undoes the typing.
  if (mod && !inField && !e.altKey && !e.shiftKey && e.key.toLowerCase() === 'z') return 'undo';
  if (e.key === 'Escape') return 'cancel';
  if (inField || mod || e.altKey) return null;
  switch (e.key) {
    case 'p':
    case 'P':
      return 'pack';
    case 's':
    case 'S':
      return 'save';
    case 'k':
    case 'K':
      return 'keep';
    case '0':
    case 'f':
    case 'F':
      return 'fit';
    case 'c':
    case 'C':
      return 'frame';
    case '1':
      return 'top';
    case '2':
      return 'front';
    case '3':
      return 'side';
    case ']':
    case '}':
      return 'layerUp';
    case '[':
    case '{':
      return 'layerDown';
    case 'ArrowLeft':
      return 'moveLeft';
    case 'ArrowRight':
      return 'moveRight';
    case 'ArrowUp':
      return 'moveBack';
    case 'ArrowDown':
      return 'moveFront';
    case 'r':
    case 'R':
      return 'turn';
    case 'd':
    case 'D':
      return 'drop';
    case '?':
      return 'help';
    default:
      return null;
  }
}
