/**
 * JSON Pointer of the first number in an object tree that is NaN or ±Infinity, or null if there is
 * none. Walks plain objects and arrays (and typed arrays); other values are ignored.
 *
 * @param value  any JSON-like tree
 * @returns e.g. "/results/0/ratios/niiHa", or null
 * @example findNonFinite({ a: [1, NaN] }) // "/a/1"
 */
export function findNonFinite(value: unknown): string | null {
  return walk(value, '')
}

function walk(value: unknown, path: string): string | null {
  if (typeof value === 'number') return Number.isFinite(value) ? null : path || '/'
  if (value === null || typeof value !== 'object') return null
  if (ArrayBuffer.isView(value)) {
    const arr = value as unknown as ArrayLike<number>
    for (let i = 0; i < arr.length; i++) if (typeof arr[i] === 'number' && !Number.isFinite(arr[i])) return `${path}/${i}`
    return null
  }
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const hit = walk(value[i], `${path}/${i}`)
      if (hit !== null) return hit
    }
    return null
  }
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
    const hit = walk(v, `${path}/${k.replaceAll('~', '~0').replaceAll('/', '~1')}`)
    if (hit !== null) return hit
  }
  return null
}

/**
 * Throw if any number in the tree is NaN or ±Infinity (public API rule: every number in a response
 * is finite or null; shared/science/README.md §10). The server calls this on every response body of the science routes.
 *
 * @param value  any JSON-like tree
 * @param label  prefix for the error message
 * @throws {TypeError} naming the JSON Pointer of the first offending number
 * @example assertAllFinite({ ebv: 0.3 }) // undefined (passes; a NaN or ±Infinity anywhere throws)
 */
export function assertAllFinite(value: unknown, label = 'value'): void {
  const hit = findNonFinite(value)
  if (hit !== null) throw new TypeError(`${label} has a non-finite number at ${hit}`)
}
