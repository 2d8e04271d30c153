import { COMMON_PASSWORDS } from './common-passwords.ts'
import { isWellFormed } from './schemas/text.ts'

export const PASSWORD_MIN_CHARS = 10
/** bcrypt reads only the first 72 bytes of its input (Provos & Mazières 1999, the key schedule's 18 × 32-bit words). */
export const PASSWORD_MAX_BYTES = 72

/** The rule as the forms show it before anyone types, and as the API states it. */
export const PASSWORD_RULE = `At least ${PASSWORD_MIN_CHARS} characters and at most ${PASSWORD_MAX_BYTES} bytes (about ${PASSWORD_MAX_BYTES} letters; accents and emoji take 2–4 bytes each). Not a common password and not one character or a short group repeated.`

export const utf8Bytes = (s: string) => new TextEncoder().encode(s).length

/** "aaaaaaaaaa", "ababababab", "123123123123": a unit of up to three characters repeated. */
export function isRepetition(s: string): boolean {
  const chars = Array.from(s)
  for (let unit = 1; unit <= 3 && unit * 2 <= chars.length; unit++) {
    if (chars.every((c, i) => c === chars[i % unit])) return true
  }
  return false
}

export const isCommonPassword = (s: string) => COMMON_PASSWORDS.has(s.toLowerCase())

/** Why a new password is refused, or null when it is acceptable (one check for server and forms). */
export function passwordProblem(p: string): string | null {
  // a lone UTF-16 surrogate has no UTF-8 form: two different ones would hash the same
  if (!isWellFormed(p)) return 'contains a broken character (an unpaired UTF-16 surrogate)'
  if (Array.from(p).length < PASSWORD_MIN_CHARS) return `use at least ${PASSWORD_MIN_CHARS} characters`
  if (utf8Bytes(p) > PASSWORD_MAX_BYTES) return `use at most ${PASSWORD_MAX_BYTES} bytes (this one has ${utf8Bytes(p)}); longer passwords would be cut silently`
  if (isRepetition(p)) return 'a character or short group repeated is too easy to guess'
  if (isCommonPassword(p)) return 'this is one of the most common passwords; choose another'
  return null
}
