/**
 * Sinterstack's design tokens. The palette is built around a powder bed:
 * a warm off-white "powder" ground, graphite ink, an ember accent for actions
 * (the heat of sintering) and a muted teal for status (the cooled part).
 */
export const colors = {
  powder: '#F6F1E9',
  powderDeep: '#EDE5D8',
  surface: '#FFFDF9',
  line: '#DED4C4',
  lineStrong: '#C9BCA8',
  ink: '#24211E',
  inkMuted: '#655D53',
  inkFaint: '#8F867A',
  graphite: '#2B2723',
  graphiteRaised: '#3A352F',
  onGraphite: '#F3ECE1',
  onGraphiteMuted: '#B5AA9A',
  ember: '#C9501C',
  emberPressed: '#A84115',
  emberSoft: '#FBE4D7',
  onEmber: '#FFF8F2',
  teal: '#3C7773',
  tealSoft: '#DCEAE7',
  amber: '#9A6A12',
  amberSoft: '#F6EACF',
  danger: '#A3302A',
  dangerSoft: '#F7DEDA',
  focus: '#E58A4E',
} as const;

export const spacing = {
  none: 0,
  xxs: 2,
  xs: 4,
  sm: 8,
  md: 12,
  lg: 16,
  xl: 24,
  xxl: 32,
  xxxl: 48,
} as const;

export const radius = {
  sm: 4,
  md: 8,
  lg: 14,
  pill: 999,
} as const;

export const fonts = {
  regular: 'Inter_400Regular',
  medium: 'Inter_500Medium',
  semibold: 'Inter_600SemiBold',
  bold: 'Inter_700Bold',
  mono: 'RobotoMono_400Regular',
  monoMedium: 'RobotoMono_500Medium',
  monoBold: 'RobotoMono_700Bold',
} as const;

/** Type scale: size and line height in px. */
export const type = {
  display: { fontSize: 30, lineHeight: 36, fontFamily: fonts.bold, letterSpacing: -0.4 },
  title: { fontSize: 22, lineHeight: 28, fontFamily: fonts.semibold, letterSpacing: -0.2 },
  heading: { fontSize: 17, lineHeight: 24, fontFamily: fonts.semibold },
  body: { fontSize: 15, lineHeight: 22, fontFamily: fonts.regular },
  bodyStrong: { fontSize: 15, lineHeight: 22, fontFamily: fonts.semibold },
  label: { fontSize: 13, lineHeight: 18, fontFamily: fonts.medium },
  caption: { fontSize: 12, lineHeight: 16, fontFamily: fonts.regular },
  overline: { fontSize: 11, lineHeight: 14, fontFamily: fonts.semibold, letterSpacing: 0.8, textTransform: 'uppercase' as const },
  figure: { fontSize: 15, lineHeight: 22, fontFamily: fonts.mono },
  figureLarge: { fontSize: 34, lineHeight: 40, fontFamily: fonts.monoMedium, letterSpacing: -0.5 },
} as const;

/** Minimum touch target (px): gloved hands at a machine. */
export const touchTarget = 48;

/** Width at which the app switches from a bottom tab bar to a side rail. */
export const wideBreakpoint = 1024;
/** The side rail of the wide layout (components/lab/LabShell.tsx). */
export const railWidth = 248;
/** The widest a page's column grows (components/ui/Screen.tsx). */
export const pageMaxWidth = 1180;

export const theme = { colors, spacing, radius, fonts, type, touchTarget, wideBreakpoint } as const;
export type Theme = typeof theme;
export type ColorName = keyof typeof colors;
export type TypeVariant = keyof typeof type;
