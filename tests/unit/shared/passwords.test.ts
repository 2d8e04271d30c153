import { describe, expect, it } from 'vitest'
import { COMMON_PASSWORDS } from '../../../shared/common-passwords.ts'
import { PASSWORD_MAX_BYTES, isRepetition, passwordProblem, utf8Bytes } from '../../../shared/passwords.ts'

describe('the rule for new passwords', () => {
  it('counts UTF-8 bytes, because bcrypt ignores everything after 72 of them (Provos & Mazières 1999)', () => {
    expect(PASSWORD_MAX_BYTES).toBe(72)
    expect(utf8Bytes('abc')).toBe(3)
    expect(utf8Bytes('ü')).toBe(2)
    expect(utf8Bytes('€')).toBe(3)
    expect(utf8Bytes('🔭')).toBe(4)
    expect(passwordProblem('a1b2c3d4e5'.repeat(7) + 'xy')).toBeNull() // 72 bytes
    expect(passwordProblem('a1b2c3d4e5'.repeat(7) + 'xyz')).toBe('use at most 72 bytes (this one has 73); longer passwords would be cut silently')
    expect(passwordProblem('🔭 telescope ' + '🔭'.repeat(15))).toBe('use at most 72 bytes (this one has 75); longer passwords would be cut silently') // 27 characters, 15 + 60 bytes
  })

  it('refuses one character or a group of up to three repeated (NIST SP 800-63B §5.1.1.2: "repetitive characters")', () => {
    for (const p of ['aaaaaaaaaa', '🔭🔭🔭🔭🔭🔭🔭🔭🔭🔭', 'abababababab', '123123123123', 'xyzxyzxyzx']) expect(isRepetition(p), p).toBe(true)
    for (const p of ['abcdabcdabcd', 'lantern-owner-2026', 'aaaaaaaaab']) expect(isRepetition(p), p).toBe(false)
    expect(passwordProblem('aaaaaaaaaaaa')).toBe('a character or short group repeated is too easy to guess')
  })

  it('refuses the common-password list in any letter case, and counts length in characters', () => {
    expect(COMMON_PASSWORDS.size).toBeGreaterThan(250)
    for (const p of COMMON_PASSWORDS) expect(Array.from(p).length, p).toBeGreaterThanOrEqual(10) // shorter ones fail on length anyway
    expect(passwordProblem('Password123')).toBe('this is one of the most common passwords; choose another')
    expect(passwordProblem('QWERTYUIOP')).toBe('this is one of the most common passwords; choose another')
    expect(passwordProblem('short')).toBe('use at least 10 characters')
    expect(passwordProblem('üüüüüabcde')).toBeNull() // 10 characters, 15 bytes
  })

  it('accepts the demo and test passwords the README and tests use', () => {
    for (const p of ['lantern-owner-2026', 'lantern-analyst-2026', 'lantern-viewer-2026', 'correct horse battery', 'a long enough password']) expect(passwordProblem(p), p).toBeNull()
  })
})
