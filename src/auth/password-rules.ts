/**
 * Rules for new passwords beyond length, after NIST SP 800-63B section 5.1.1.2 ("Memorized
 * Secret Verifiers"): compare the prospective secret with values known to be commonly used,
 * expected or compromised: passwords from breach corpuses, repetitive or sequential characters
 * ("aaaaaa", "1234abcd") and context-specific words (the service's name). Pure:
 * the list is handed in.
 */

/** Words of this product and its setting that make a guessable password (common practice, no source). */
export const CONTEXT_WORDS = [
  'phosledger',
  'phosphate',
  'phosphorus',
  'dietitian',
  'dietician',
  'renal',
  'kidney',
  'dialysis',
  'clinic',
  'admin',
  'administrator',
] as const;

/** Sequences people type: the alphabet, digits and the three letter rows of a QWERTY keyboard. */
const SEQUENCES = [
  'abcdefghijklmnopqrstuvwxyz',
  '01234567890',
  'qwertyuiop',
  'asdfghjkl',
  'zxcvbnm',
];

/** A run shorter than this is not counted as a trivial pattern (NIST's examples use 4 and 6). */
const MIN_RUN = 3;

function adjacent(a: string, b: string): boolean {
  if (a === b) return true;
  return SEQUENCES.some((seq) => {
    const i = seq.indexOf(a);
    return i >= 0 && (seq[i + 1] === b || seq[i - 1] === b);
  });
}

/**
 * True when the whole password is runs (of at least 3) of one repeated character or of
 * neighbours in a sequence: "aaaaaaaaaaaa", "123456789012", "abcd1234efgh", "qwertyuiopas".
 */
export function isTrivialSequence(password: string): boolean {
  const chars = [...password.toLowerCase()];
  let run = 1;
  for (let i = 1; i <= chars.length; i++) {
    if (i < chars.length && adjacent(chars[i - 1]!, chars[i]!)) {
      run += 1;
      continue;
    }
    if (run < MIN_RUN) return false;
    run = 1;
  }
  return chars.length > 0;
}

/** True when the password is one shorter piece said again: "abcabcabcabc", "passwordpassword". */
export function isRepetition(password: string): boolean {
  return /^([\s\S]+?)\1+$/u.test(password.toLowerCase());
}

/** Lower case, compatibility forms folded, spaces dropped: how the list is compared. */
function squash(password: string): string {
  return password.normalize('NFKC').toLowerCase().replace(/\s+/gu, '');
}

/** The password without the digits and symbols people add at either end ("Password2024!" -> "password"). */
function core(password: string): string {
  return squash(password).replace(/^[^\p{L}]+|[^\p{L}]+$/gu, '');
}

/**
 * Why a new password is refused by the SP 800-63B 5.1.1.2 checks, or null. `common` holds
 * lower-case passwords from breach corpuses (the username rule is `passwordProblem`'s).
 */
export function commonPasswordProblem(
  password: string,
  common: ReadonlySet<string>,
): string | null {
  const whole = squash(password);
  const base = core(password);
  if (common.has(whole) || (base.length >= 4 && common.has(base))) {
    return 'this password is on a list of common or breached passwords: choose another (a few unrelated words make a strong one)';
  }
  if (isRepetition(whole) || isTrivialSequence(whole)) {
    return 'this password is a repeated or sequential pattern (like "aaaa" or "1234abcd"): choose another';
  }
  if (whole.includes('phosledger') || (CONTEXT_WORDS as readonly string[]).includes(base)) {
    return 'this password is built on the name of this service or its setting: choose another';
  }
  return null;
}
