/**
 * The password policy, after NIST SP 800-63B (Digital Identity Guidelines,
 * §5.1.1.2 "Memorized Secret Verifiers"): length rather than composition
 * rules (at least 10 characters here, any characters, spaces included, up to
 * 200), and a new password is compared against a list of passwords known
 * from breaches and against repetitive or sequential characters and words of
 * the context (the service's name, the person's e-mail and name). No hints,
 * no forced periodic changes.
 */
import { dictionary } from '@zxcvbn-ts/language-common';
import { AppError } from '../errors';
import { PASSWORD_MIN } from '../../shared/schemas/auth';

// zxcvbn-ts's common-password list (about 49,000 entries from published breach corpora), lower case.
let common: Set<string> | undefined;
function commonPasswords(): Set<string> {
  common ??= new Set((dictionary as Record<string, string[]>)['passwords-common'].map((p) => p.toLowerCase()));
  return common;
}

const SEQUENCES = ['0123456789012345678901234567890', 'abcdefghijklmnopqrstuvwxyzabcdefghijklmnopqrstuvwxyz', 'qwertyuiopasdfghjklzxcvbnm', 'qwertzuiopasdfghjklyxcvbnm', 'azertyuiopqsdfghjklmwxcvbn'];

/** Why a new password is refused, or null when it may be used. */
export function weakPasswordReason(password: string, context: { email?: string; name?: string } = {}): string | null {
  if ([...password].length < PASSWORD_MIN) return `must be at least ${PASSWORD_MIN} characters`;
  const lower = password.toLowerCase();
  const squeezed = lower.replace(/\s+/g, '');
  if (squeezed.length === 0) return 'must not be only spaces';
  if (new Set(squeezed).size <= 2) return 'repeats one or two characters; choose a longer phrase of different words';
  // The text itself, or it with a short run of digits or punctuation around it, is a known common password.
  const core = squeezed.replace(/^[\d\W_]{0,4}|[\d\W_]{0,4}$/g, '');
  if (commonPasswords().has(lower) || commonPasswords().has(squeezed) || (core.length >= 4 && commonPasswords().has(core))) {
    return 'is on the list of common passwords that attackers try first';
  }
  for (const run of SEQUENCES) {
    const reversed = [...run].reverse().join('');
    if (run.includes(squeezed) || reversed.includes(squeezed)) return 'is a run of keys or characters in order';
  }
  const words = ['sinterstack', ...(context.email ? [context.email.toLowerCase(), context.email.split('@')[0].toLowerCase()] : []), ...(context.name ? [context.name.toLowerCase().replace(/\s+/g, '')] : [])];
  for (const w of words) {
    if (w.length >= 4 && (squeezed === w || squeezed.replace(/[\d\W_]+$/, '') === w)) return 'is your e-mail, your name or the name of this service';
  }
  return null;
}

/** Throws a 400 naming `field` when the new password is refused. */
export function assertStrongPassword(password: string, context: { email?: string; name?: string } = {}, field = 'password'): void {
  const reason = weakPasswordReason(password, context);
  if (reason) throw new AppError(400, 'weak_password', `${field} ${reason}.`, field);
}
