/**
 * Flagged values, the typed input error and small input guards of the science library.
 *
 * A flag says that a value is legitimate but doubtful or why it is `null`; every flag, its bit in the
 * kernel and its caution text are in the registry shared/vocabulary/flags.ts. Impossible inputs throw a
 * `ScienceInputError` instead.
 */

/** A value with the flags that qualify it. */
export interface Flagged<T> {
  value: T
  flags: string[]
}

/**
 * An impossible input (non-finite, negative where the physics forbids it, zero error, unknown line).
 * `path` is a JSON Pointer (RFC 6901) to the offending value relative to the object passed in,
 * e.g. `/lines/hbeta/error`; `diagnoseMany` prefixes the galaxy index (`/3/lines/hbeta/error`).
 * The API schema should have refused such input with a 422 already; the server maps this error to a
 * 422 with `errors: [{ path, message }]`.
 */
export class ScienceInputError extends Error {
  readonly path: string
  constructor(path: string, message: string) {
    super(message)
    this.name = 'ScienceInputError'
    this.path = path
  }
}

/** Throw a `ScienceInputError` unless `value` is a finite number. */
export function requireFinite(path: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new ScienceInputError(path, `${path} must be a finite number, got ${String(value)}`)
  }
  return value
}

/** Throw a `ScienceInputError` unless `value` is a finite number > 0. */
export function requirePositiveFinite(path: string, value: unknown): number {
  const v = requireFinite(path, value)
  if (!(v > 0)) throw new ScienceInputError(path, `${path} must be greater than 0, got ${v}`)
  return v
}
