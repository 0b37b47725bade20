import { apiProblem, type ApiProblem } from '~/utils/api-problem'

/**
 * One way to run an API call from a screen: clears the last notice and problem, runs, then shows
 * either the success sentence or the server's problem (through apiProblem, the one error path).
 */
export function useApiAction () {
  const notice = ref('')
  const problem = ref<ApiProblem | null>(null)
  const busy = ref(false)
  async function act (fn: () => Promise<unknown>, ok: string): Promise<boolean> {
    notice.value = ''
    problem.value = null
    busy.value = true
    try {
      await fn()
      notice.value = ok
      return true
    }
    catch (e) {
      problem.value = apiProblem(e)
      return false
    }
    finally {
      busy.value = false
    }
  }
  return { notice, problem, busy, act }
}
