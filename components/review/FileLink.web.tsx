import { colors, fonts, radius, spacing, touchTarget } from '../theme';
import type { FileLinkProps } from './FileLink';

export type { FileLinkProps } from './FileLink';

/** On the web a real link with `download`, so the browser saves the file under the server's name. */
export function FileLink({ href, label, hint, testID }: FileLinkProps) {
  return (
    <a
      href={href}
      download
      data-testid={testID}
      title={hint}
      style={{
        display: 'inline-flex',
        flexDirection: 'column',
        justifyContent: 'center',
        minHeight: touchTarget,
        boxSizing: 'border-box',
        padding: `${spacing.xs}px ${spacing.md}px`,
        borderRadius: radius.md,
        border: `1px solid ${colors.lineStrong}`,
        background: colors.surface,
        textDecoration: 'none',
      }}
    >
      <span style={{ fontFamily: fonts.semibold, fontSize: 15, lineHeight: '22px', color: colors.emberPressed }}>{label}</span>
      {hint ? <span style={{ fontFamily: fonts.regular, fontSize: 12, lineHeight: '16px', color: colors.inkMuted }}>{hint}</span> : null}
    </a>
  );
}
