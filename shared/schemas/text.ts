import { z } from 'zod'

/**
 * Text rules shared by every text field of the API. Control characters (C0, DEL and C1) never
 * belong in a name, an ID or a search: PostgreSQL cannot store NUL at all, and the others turn
 * into invisible differences or broken exports. Notes and descriptions may hold line breaks and
 * tabs. Unpaired UTF-16 surrogates are not Unicode text and cannot be stored either.
 */
export const SINGLE_LINE_PATTERN = /^[^\u0000-\u001f\u007f-\u009f]*$/
export const MULTI_LINE_PATTERN = /^[^\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]*$/

export const CONTROL_MESSAGE = 'must not contain control characters (such as NUL)'
export const MULTI_LINE_CONTROL_MESSAGE = 'must not contain control characters (such as NUL) other than line breaks and tabs'
export const SURROGATE_MESSAGE = 'must be valid Unicode text (it holds an unpaired surrogate)'

/** True when `s` is well-formed Unicode (no lone surrogate), without relying on String.isWellFormed. */
export function isWellFormed(s: string): boolean {
  return !/[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/.test(s)
}

/** The same rules as a plain predicate, for values checked outside a schema (cursors, file names). */
export function isCleanText(s: string, multiline = false): boolean {
  return (multiline ? MULTI_LINE_PATTERN : SINGLE_LINE_PATTERN).test(s) && isWellFormed(s)
}

/** A single-line text field: names, IDs, e-mail addresses, searches. Chain .trim()/.min()/.max() after it. */
export const textLine = () => z.string().regex(SINGLE_LINE_PATTERN, CONTROL_MESSAGE).refine(isWellFormed, SURROGATE_MESSAGE)

/** A text field that may span lines (descriptions, notes): line breaks and tabs are allowed. */
export const textBlock = () => z.string().regex(MULTI_LINE_PATTERN, MULTI_LINE_CONTROL_MESSAGE).refine(isWellFormed, SURROGATE_MESSAGE)

/** PostgreSQL `integer`: identifiers and revisions above it cannot exist. */
export const INT4_MAX = 2_147_483_647

/** A positive integer from a path or query string that fits an `integer` column. */
export const positiveInt4 = () => z.coerce.number().int().min(1).max(INT4_MAX)

/** A positive integer from a path that fits a `bigint` column and a JavaScript number exactly. */
export const positiveBigId = () => z.coerce.number().int().min(1).max(Number.MAX_SAFE_INTEGER)
