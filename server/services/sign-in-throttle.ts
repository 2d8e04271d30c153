import { and, eq, gt, lt, or, sql } from 'drizzle-orm'
import { ipKeyGenerator } from 'express-rate-limit'
import type { Db } from '../db/client.ts'
import { signInFailures } from '../db/schema.ts'
import { HttpProblem } from '../http/problem.ts'

/**
 * Backing off after failed passwords, counted per (e-mail as typed, client address) and per client
 * address, never per account alone: five wrong passwords from one address slow that address down
 * for that e-mail, while the owner signing in from anywhere else is not affected. The e-mail is
 * the key whether or not an account has it, so a 429 says nothing about which addresses exist.
 */
export const THROTTLE = {
  /** failures of one (e-mail, address) before it backs off */
  pairFree: 5,
  /** failures of one address, over all e-mails, before it backs off (password spraying) */
  addressFree: 30,
  maxLockS: 15 * 60,
  /** counters start again after this long without a failure */
  forgetAfterS: 24 * 3600,
} as const

/** Lock after the n-th failure: none while free, then 2, 4, 8 … s, at most maxLockS. */
export function lockSeconds(failures: number, free: number, maxLockS: number = THROTTLE.maxLockS): number {
  return failures < free ? 0 : Math.min(maxLockS, 2 ** (failures - free + 1))
}

/** IPv6 clients are counted per /56 (express-rate-limit's subnet), so rotating within it does not help. */
const clientKey = (ip: string | undefined) => (ip ? ipKeyGenerator(ip) : 'unknown')

/**
 * Removes counters whose last failure is older than `forgetAfterS` (they would start again at 1
 * anyway): the runtime's hourly sweep, so a failed sign-in never scans the whole table.
 */
export async function forgetOldSignInFailures(db: Db) {
  await db.delete(signInFailures).where(lt(signInFailures.lastFailureAt, sql`now() - make_interval(secs => ${THROTTLE.forgetAfterS})`))
}

export function signInThrottle(db: Db) {
  const pairs = (email: string, ip: string | undefined) => {
    const addr = clientKey(ip)
    return [...(email ? [{ email, ip: addr, free: THROTTLE.pairFree }] : []), { email: '', ip: addr, free: THROTTLE.addressFree }]
  }

  return {
    /** 429 with Retry-After while the (e-mail, address) or the address is backing off; checked before any hashing. */
    async check(email: string, ip: string | undefined) {
      const keys = pairs(email, ip)
      const rows = await db.select({ lockedUntil: signInFailures.lockedUntil }).from(signInFailures)
        .where(and(or(...keys.map((k) => and(eq(signInFailures.email, k.email), eq(signInFailures.ip, k.ip)))), gt(signInFailures.lockedUntil, sql`now()`)))
      if (!rows.length) return
      const until = Math.max(...rows.map((r) => r.lockedUntil!.getTime()))
      const wait = Math.max(1, Math.ceil((until - Date.now()) / 1000))
      throw new HttpProblem(429, 'Too Many Requests', 'too many failed sign-ins from this address; wait before trying again', undefined, { 'Retry-After': String(wait) })
    },

    /** Counts one failure for the (e-mail, address) and the address; returns the pair's count. */
    async fail(email: string, ip: string | undefined): Promise<number> {
      let pairFailures = 0
      for (const k of pairs(email, ip)) {
        const [row] = await db.insert(signInFailures).values({ email: k.email, ip: k.ip, failures: 1, lastFailureAt: sql`now()` })
          .onConflictDoUpdate({
            target: [signInFailures.email, signInFailures.ip],
            set: {
              failures: sql`case when ${signInFailures.lastFailureAt} < now() - make_interval(secs => ${THROTTLE.forgetAfterS}) then 1 else ${signInFailures.failures} + 1 end`,
              lastFailureAt: sql`now()`,
            },
          }).returning({ failures: signInFailures.failures })
        const lockS = lockSeconds(row.failures, k.free)
        if (lockS) {
          await db.update(signInFailures).set({ lockedUntil: sql`now() + make_interval(secs => ${lockS})` })
            .where(and(eq(signInFailures.email, k.email), eq(signInFailures.ip, k.ip)))
        }
        if (k.email) pairFailures = row.failures
      }
      return pairFailures
    },

    /** A right password clears its (e-mail, address); the address counter keeps counting. */
    async succeed(email: string, ip: string | undefined) {
      await db.delete(signInFailures).where(and(eq(signInFailures.email, email), eq(signInFailures.ip, clientKey(ip))))
    },

    /** A password reset proves the owner: every address may try that e-mail afresh. */
    async forget(email: string) {
      await db.delete(signInFailures).where(eq(signInFailures.email, email))
    },
  }
}
