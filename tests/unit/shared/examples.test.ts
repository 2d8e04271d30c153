import { readdirSync, readFileSync } from 'node:fs'
import { dirname, join, relative, resolve } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { describe, expect, it } from 'vitest'

/**
 * Every `@example` in shared/ and server/ runs here against the real module exports.
 *
 * Convention (one line each): `@example <code> // <expected>` or `@example <code> // ≈ <expected>`,
 * optionally followed by a note in parentheses: ` (shared/science/README.md §3)`.
 * - <code> is JavaScript; statements may come first (`const o = …; f(o); o`), the last one is the value.
 * - <expected> is a JavaScript expression in the same scope (a literal, a class constant, `Math.E - 1`).
 *   Without ≈ the value must equal it exactly (deep equality; typed arrays compared as arrays).
 * - `≈ <number literal>`: equal to within half a unit in the last digit written (`≈ 1.000` → ±5e-4,
 *   `≈ 6.822e7` → ±5e3); `≈ <other expression>`: every number within 1e-12 relative.
 * Names in scope: the file's own exports, then those of the modules it imports, then the science barrel.
 * An @example without a checkable result fails here.
 */
const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../../..')
const SOURCE_DIRS = ['shared', 'server']

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = join(dir, e.name)
    if (e.isDirectory()) return sourceFiles(p)
    return /\.ts$/.test(e.name) && !e.name.endsWith('.d.ts') ? [p] : []
  })
}

interface Example { file: string; line: number; text: string }

function examplesIn(file: string): Example[] {
  const out: Example[] = []
  readFileSync(file, 'utf8').split('\n').forEach((l, i) => {
    const m = /^\s*(?:\/\*\*|\*)?\s*@example\b(.*)$/.exec(l)
    if (m) out.push({ file: relative(ROOT, file), line: i + 1, text: m[1].trim() })
  })
  return out
}

/** Splits at top-level `;` (outside brackets and strings). */
function statements(code: string): string[] {
  const parts: string[] = []
  let depth = 0, quote = '', start = 0
  for (let i = 0; i < code.length; i++) {
    const ch = code[i]
    if (quote) { if (ch === '\\') i++; else if (ch === quote) quote = ''; continue }
    if (ch === "'" || ch === '"' || ch === '`') quote = ch
    else if ('([{'.includes(ch)) depth++
    else if (')]}'.includes(ch)) depth--
    else if (ch === ';' && depth === 0) { parts.push(code.slice(start, i)); start = i + 1 }
  }
  parts.push(code.slice(start))
  return parts.map((s) => s.trim()).filter(Boolean)
}

interface Parsed { code: string; approx: boolean; expected: string }

function parse(text: string): Parsed {
  const at = text.indexOf(' // ')
  if (at < 0) throw new Error('no "// <expected>" result: write `@example <code> // <expected>` on one line')
  const code = text.slice(0, at).trim()
  // a trailing note in parentheses, after a space, is not part of the expected value
  const expectedText = text.slice(at + 4).trim().replace(/\s+\((?:[^()]|\([^()]*\))*\)$/, '').trim()
  const approx = expectedText.startsWith('≈')
  const expected = approx ? expectedText.slice(1).trim() : expectedText
  if (!code || !expected) throw new Error('an empty code or result part')
  return { code, approx, expected }
}

function evaluate(code: string, scope: Record<string, unknown>): unknown {
  const parts = statements(code)
  const body = [...parts.slice(0, -1), `return (${parts[parts.length - 1]})`].join(';\n')
  const names = Object.keys(scope).filter((n) => /^[A-Za-z_$][\w$]*$/.test(n))
  return new Function(...names, body)(...names.map((n) => scope[n]))
}

/** Half a unit in the last written digit of a number literal ("≈ 0.0070" → 5e-5). */
function halfUnitOfLastDigit(literal: string): number | null {
  const m = /^[+-]?(\d*)(?:\.(\d*))?(?:e([+-]?\d+))?$/i.exec(literal.replace(/_/g, ''))
  if (!m || (m[1] === '' && !m[2])) return null
  return 0.5 * 10 ** (-(m[2]?.length ?? 0) + Number(m[3] ?? 0))
}

const plain = (v: unknown): unknown => (ArrayBuffer.isView(v) ? Array.from(v as unknown as ArrayLike<number>) : v)

function closeTo(actual: unknown, expected: unknown, where = ''): string | null {
  actual = plain(actual); expected = plain(expected)
  if (typeof expected === 'number') {
    if (typeof actual !== 'number') return `${where}: ${String(actual)} is not a number`
    return Math.abs(actual - expected) <= 1e-12 * Math.max(Math.abs(expected), 1e-300) ? null : `${where}: ${actual} vs ${expected}`
  }
  if (Array.isArray(expected)) {
    if (!Array.isArray(actual) || actual.length !== expected.length) return `${where}: ${JSON.stringify(actual)} vs ${JSON.stringify(expected)}`
    for (const [i, e] of expected.entries()) { const d = closeTo(actual[i], e, `${where}[${i}]`); if (d) return d }
    return null
  }
  if (expected && typeof expected === 'object') {
    if (!actual || typeof actual !== 'object') return `${where}: ${JSON.stringify(actual)} is not an object`
    const keys = new Set([...Object.keys(expected), ...Object.keys(actual)])
    for (const k of keys) { const d = closeTo((actual as Record<string, unknown>)[k], (expected as Record<string, unknown>)[k], `${where}.${k}`); if (d) return d }
    return null
  }
  return Object.is(actual, expected) ? null : `${where}: ${String(actual)} vs ${String(expected)}`
}

/** Relative import specifiers of a source file, resolved to absolute paths. */
function importsOf(file: string): string[] {
  const src = readFileSync(file, 'utf8')
  return [...src.matchAll(/^import\s+(?!type\b)[^'"]*?from\s+'(\.[^']+)'/gm)].map((m) => resolve(dirname(file), m[1]))
}

async function scopeFor(file: string): Promise<Record<string, unknown>> {
  const barrel = await import(pathToFileURL(join(ROOT, 'shared/science.ts')).href)
  const imported = await Promise.all(importsOf(file).map((f) => import(pathToFileURL(f).href)))
  const own = await import(pathToFileURL(file).href)
  return Object.assign({}, barrel, ...imported, own)
}

const examples = SOURCE_DIRS.flatMap((d) => sourceFiles(join(ROOT, d))).flatMap(examplesIn)

describe('@example blocks in the source run and state their result', () => {
  it('finds the examples (shared/ holds dozens)', () => {
    expect(examples.length).toBeGreaterThan(50)
  })

  it.each(examples.map((e) => [`${e.file}:${e.line}`, e] as const))('%s', async (_where, e) => {
    const { code, approx, expected } = parse(e.text)
    const scope = await scopeFor(join(ROOT, e.file))
    const actual = evaluate(code, scope)
    const want = evaluate(expected, scope)
    if (!approx) {
      expect(plain(actual), `${code} // ${expected}`).toEqual(plain(want))
      return
    }
    const half = halfUnitOfLastDigit(expected)
    if (half !== null) {
      expect(typeof actual, code).toBe('number')
      expect(Math.abs((actual as number) - (want as number)), `${code} = ${String(actual)}, written ≈ ${expected} (±${half})`).toBeLessThanOrEqual(half * (1 + 1e-9))
    } else {
      expect(closeTo(actual, want), `${code} ≈ ${expected}`).toBeNull()
    }
  })
})

describe('the @example convention itself', () => {
  it('refuses an example without a result and reads notes, ≈ and statements', () => {
    expect(() => parse('createRng(1).nextFloat()')).toThrow(/no "\/\/ <expected>" result/)
    expect(parse('isDetection(10, 2, 3) // true (S/N = 5)')).toEqual({ code: 'isDetection(10, 2, 3)', approx: false, expected: 'true' })
    expect(parse('f(1) // ≈ 0.339 (shared/science/README.md §1.2 check: 0.3392)')).toEqual({ code: 'f(1)', approx: true, expected: '0.339' })
    expect(parse('g() // Float64Array.of(1, 2)')).toEqual({ code: 'g()', approx: false, expected: 'Float64Array.of(1, 2)' })
    expect(halfUnitOfLastDigit('1.000')).toBeCloseTo(5e-4, 15)
    expect(halfUnitOfLastDigit('+0.0070')).toBeCloseTo(5e-5, 15)
    expect(halfUnitOfLastDigit('6.822e7')).toBe(5e3)
    expect(halfUnitOfLastDigit('Math.E - 1')).toBeNull()
    expect(evaluate('const o = [1]; o.push(2); o', {})).toEqual([1, 2])
  })
})
