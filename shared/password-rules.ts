/**
 * Password rules for people (devices get random secrets). Pure, so the sign-up and admin screens can
 * show the same message the server gives.
 *
 * - at least 12 characters: length is what makes a password hard to guess;
 * - at most 72 bytes in UTF-8: bcrypt ignores everything after byte 72, so a longer password would
 *   silently sign in with any tail;
 * - not a well-known password, not the e-mail, not built on the product's name.
 * The list below is a short built-in one (the most common passwords of published leak statistics,
 * from memory, plus patterns); it is not a complete breach list.
 */
export const PASSWORD_MIN_CHARS = 12;
export const PASSWORD_MAX_BYTES = 72;
export const PRODUCT_NAME = 'jacketwatch';

const COMMON = new Set([
  '123456789012',
  '1234567890123',
  '12345678901234',
  '123456123456',
  '123123123123',
  '111111111111',
  '000000000000',
  '123412341234',
  '987654321000',
  '098765432109',
  'qwertyuiopas',
  'qwertyuiop12',
  'qwertyuiop123',
  'qwerty123456',
  '1qaz2wsx3edc',
  '1q2w3e4r5t6y',
  'q1w2e3r4t5y6',
  'zaq12wsxcde3',
  'asdfghjkl123',
  'password1234',
  'password12345',
  'passwordpassword',
  'password123!',
  'password@123',
  'p@ssw0rd1234',
  'p@ssword1234',
  'iloveyou1234',
  'letmein12345',
  'welcome12345',
  'welcome123456',
  'administrator',
  'admin1234567',
  'adminadmin123',
  'changeme1234',
  'football1234',
  'baseball1234',
  'sunshine1234',
  'princess1234',
  'monkey123456',
  'dragon123456',
  'superman1234',
  'trustno1trustno1',
  'abcdefghijkl',
  'abc123abc123',
  'abcd1234abcd',
  'qwertyqwerty',
  'asdfasdfasdf',
  'correcthorsebatterystaple',
  'correct horse battery staple',
  'thequickbrownfox',
  'generator1234',
  'engine123456',
  'maintenance1',
  'maintenance123',
]);

/** Runs of one character or a straight sequence (aaaaaaaaaaaa, 123456789012, abcdefghijkl). */
function trivialPattern(p: string): boolean {
  if (/^(.)\1+$/u.test(p)) return true;
  if (/^(.{1,4})\1+$/u.test(p)) return true; // short block repeated: abcabcabcabc, 12121212...
  let up = 0;
  let down = 0;
  for (let i = 1; i < p.length; i++) {
    const d = p.charCodeAt(i) - p.charCodeAt(i - 1);
    if (d === 1 || d === -9) up++;
    if (d === -1 || d === 9) down++;
  }
  return up === p.length - 1 || down === p.length - 1;
}

/** Why a password is refused, or null when it is acceptable. */
export function passwordProblem(password: string, email?: string | null): string | null {
  if ([...password].length < PASSWORD_MIN_CHARS) return `at least ${PASSWORD_MIN_CHARS} characters`;
  if (new TextEncoder().encode(password).length > PASSWORD_MAX_BYTES)
    return `at most ${PASSWORD_MAX_BYTES} bytes (only the first ${PASSWORD_MAX_BYTES} would count)`;
  const lower = password.toLowerCase();
  if (COMMON.has(lower) || trivialPattern(lower)) return 'too common or too easy to guess';
  if (lower.includes(PRODUCT_NAME)) return 'must not contain the product name';
  if (email) {
    const e = email.trim().toLowerCase();
    const local = e.split('@')[0];
    if (lower === e || (local.length >= 4 && lower.replace(/[^a-z0-9]/g, '') === local.replace(/[^a-z0-9]/g, ''))) return 'must not be the e-mail address';
  }
  return null;
}
