import { useWindowDimensions } from 'react-native';
import { pageMaxWidth, railWidth, spacing, wideBreakpoint } from './tokens';

export * from './tokens';
export { fontAssets } from './fontAssets';

export { ThemeProvider, useTheme } from './ThemeProvider';

/** True at the wide layout (side rail, dense tables). */
export function useIsWide(): boolean {
  const { width } = useWindowDimensions();
  return width >= wideBreakpoint;
}

/**
 * The width a page's content has: the window less the side rail and the page's padding on a wide screen, less the
 * padding on a narrow one, and never more than a page's column. Tables switch to cards by this rather than by the
 * window: a 1,024 px window leaves a table 680 px once the rail is drawn.
 */
export function contentWidth(windowWidth: number): number {
  const wide = windowWidth >= wideBreakpoint;
  return Math.min(pageMaxWidth, windowWidth - (wide ? railWidth + 2 * spacing.xxxl : 2 * spacing.lg));
}

export function useContentWidth(): number {
  return contentWidth(useWindowDimensions().width);
}
