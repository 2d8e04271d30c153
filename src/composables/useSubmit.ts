import { computed, ref } from 'vue'
import { ApiProblem } from '../api/http'

/**
 * Pending state and server errors for one form. Field errors are looked up by JSON pointer
 * (`errorsFor('/email')`) so they land under the input that caused them.
 */
export function useSubmit() {
  const pending = ref(false)
  const problem = ref<ApiProblem | null>(null)
  const fieldErrors = computed(() => problem.value?.fieldErrors() ?? {})

  async function run<T>(fn: () => Promise<T>): Promise<T | undefined> {
    pending.value = true
    problem.value = null
    try {
      return await fn()
    } catch (e) {
      if (e instanceof ApiProblem) { problem.value = e; return undefined }
      throw e
    } finally {
      pending.value = false
    }
  }

  function errorsFor(path: string): string[] {
    return fieldErrors.value[path] ?? []
  }

  return { pending, problem, fieldErrors, run, errorsFor }
}
