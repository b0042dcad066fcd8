import { createContext, useContext } from 'react';
import { theme, type Theme } from './tokens';

const ThemeContext = createContext<Theme>(theme);

/** Provides the tokens to the tree; one theme today, the seam for a second (e.g. a high-contrast floor theme). */
export function ThemeProvider({ value = theme, children }: { value?: Theme; children: React.ReactNode }) {
  return <ThemeContext.Provider value={value}>{children}</ThemeContext.Provider>;
}

export function useTheme(): Theme {
  return useContext(ThemeContext);
}
