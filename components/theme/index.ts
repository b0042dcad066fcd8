import { useWindowDimensions } from 'react-native';
import { theme, wideBreakpoint } from './tokens';

export * from './tokens';
export { fontAssets } from './fontAssets';

/** One theme for now; the hook keeps call sites ready for a second one. */
export function useTheme() {
  return theme;
}

/** True at the wide layout (side rail, dense tables). */
export function useIsWide(): boolean {
  const { width } = useWindowDimensions();
  return width >= wideBreakpoint;
}
