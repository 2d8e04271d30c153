import { onBeforeUnmount, ref } from 'vue'
import { ApiProblem } from '../api/http'
import { projectsApi } from '../api/projects'
import type { Job } from '../api/types'

/** Follows one job until it is done or failed, asking once a second (the server has no push channel). */
export function useJobPolling(intervalMs = 1000) {
  const job = ref<Job | null>(null)
  const problem = ref<ApiProblem | null>(null)
  let timer: ReturnType<typeof setTimeout> | null = null
  let stopped = false

  function stop() {
    stopped = true
    if (timer) clearTimeout(timer)
    timer = null
  }

  async function tick(projectId: string, jobId: string, onFinish?: (j: Job) => void) {
    try {
      job.value = await projectsApi.job(projectId, jobId)
      problem.value = null
    } catch (e) {
      if (e instanceof ApiProblem) problem.value = e; else throw e
    }
    if (stopped) return
    if (job.value && (job.value.status === 'done' || job.value.status === 'failed')) { onFinish?.(job.value); return }
    timer = setTimeout(() => tick(projectId, jobId, onFinish), intervalMs)
  }

  function follow(projectId: string, initial: Job, onFinish?: (j: Job) => void) {
    stop()
    stopped = false
    job.value = initial
    if (initial.status === 'done' || initial.status === 'failed') { onFinish?.(initial); return }
    timer = setTimeout(() => tick(projectId, initial.id, onFinish), intervalMs)
  }

  onBeforeUnmount(stop)
  return { job, problem, follow, stop }
}
