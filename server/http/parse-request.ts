import type { z } from 'zod'
import { HttpProblem, toJsonPointer } from './problem.ts'

/** Validates body, query or path with a zod schema; the only place that makes a 422. */
export function parseRequest<S extends z.ZodType>(schema: S, value: unknown, prefix: readonly PropertyKey[] = []): z.output<S> {
  const result = schema.safeParse(value)
  if (result.success) return result.data
  throw new HttpProblem(422, 'Unprocessable Content', 'the request has invalid values',
    result.error.issues.slice(0, 1000).flatMap((issue) =>
      // name the unknown key itself, so the path points at what to remove
      issue.code === 'unrecognized_keys'
        ? issue.keys.map((k) => ({ path: toJsonPointer([...prefix, ...issue.path, k]), message: `unknown field "${k}"` }))
        : [{ path: toJsonPointer([...prefix, ...issue.path]), message: issue.message }]))
}
