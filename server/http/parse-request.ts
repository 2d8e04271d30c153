import type { z } from 'zod'
import { HttpProblem, toJsonPointer, type FieldError } from './problem.ts'

/**
 * zod issues as the problem document's field errors (at most 1,000 issues). Also used on the compute
 * threads (server/compute/parse-body.task.ts), so a body validated there names the same fields.
 */
export function fieldErrors(issues: readonly z.core.$ZodIssue[], prefix: readonly PropertyKey[] = []): FieldError[] {
  return issues.slice(0, 1000).flatMap((issue) =>
    // name the unknown key itself, so the path points at what to remove
    issue.code === 'unrecognized_keys'
      ? issue.keys.map((k) => ({ path: toJsonPointer([...prefix, ...issue.path, k]), message: `unknown field "${k}"` }))
      : [{ path: toJsonPointer([...prefix, ...issue.path]), message: issue.message }])
}

/** The 422 for invalid values; the only place that makes one from field errors of a schema. */
export const invalidValues = (errors: FieldError[]) => new HttpProblem(422, 'Unprocessable Content', 'the request has invalid values', errors)

/** Validates body, query or path with a zod schema; the only place that makes a 422. */
export function parseRequest<S extends z.ZodType>(schema: S, value: unknown, prefix: readonly PropertyKey[] = []): z.output<S> {
  const result = schema.safeParse(value)
  if (result.success) return result.data
  throw invalidValues(fieldErrors(result.error.issues, prefix))
}
