/**
 * The password policy of NIST SP 800-63B §5.1.1.2: length over composition,
 * and a blocklist of breached, repetitive, sequential and context words.
 */
import { weakPasswordReason } from '../../../server/auth/policy';

describe('new passwords', () => {
  test.each([
    ['password12', 'common'],
    ['          ', 'only spaces'],
    ['aaaaaaaaaaaa', 'repeats'],
    ['abababababab', 'repeats'],
    ['1234567890', 'common'],
    ['qwertyuiop', 'common'],
    ['bcdefghijklm', 'in order'],
    ['0987654321', 'in order'],
    ['iloveyou2024', 'common'],
    ['Sinterstack1', 'name of this service'],
    ['short', 'at least 10'],
  ])('%j is refused (%s)', (password, why) => {
    expect(weakPasswordReason(password)).toContain(why === 'common' ? 'common passwords' : why);
  });

  test('the person\'s own e-mail is refused as a password', () => {
    expect(weakPasswordReason('mara.lindqvist', { email: 'mara.lindqvist@example.org' })).toContain('e-mail');
  });

  test.each([
    'correct-horse-battery',
    'sinter-demo-2026',
    'the kettle sings at dawn',
    'Z7#kq!m2Lp0x',
    'ünïcödé pässwörd',
  ])('%j is accepted: long, or unlike any list entry, whatever its composition', (password) => {
    expect(weakPasswordReason(password)).toBeNull();
  });
});
