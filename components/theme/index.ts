import { useWindowDimensions } from 'react-native';
import { wideBreakpoint } from './tokens';

export * from './tokens';
export { fontAssets } from './fontAssets';

export { ThemeProvider, useTheme } from './ThemeProvider';

/** True at the wide layout (side rail, dense tables). */
export function useIsWide(): boolean {
  const { width } = useWindowDimensions();
  return width >= wideBreakpoint;
}
