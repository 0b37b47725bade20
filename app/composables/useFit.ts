/**
 * A fit through POST /api/v1/model/fit, typed with the science core's FitResult, with one error path;
 * shared by Compare and Rate models. `applyTo` puts the fitted values into a set of curve parameters.
 */
import type { FitRequest, FitResult } from '#shared/physics'

export function useFit () {
  const fitting = ref(false)
  const result = ref<FitResult | null>(null)
  const problem = ref<ApiProblem | null>(null)
  async function run (body: FitRequest): Promise<void> {
    fitting.value = true
    problem.value = null
    result.value = null
    try {
      result.value = await $fetch<FitResult>('/api/v1/model/fit', { method: 'POST', body })
    }
    catch (e) {
      problem.value = apiProblem(e)
    }
    finally {
      fitting.value = false
    }
  }
  function clear (): void {
    result.value = null
    problem.value = null
  }
  /** The curve parameters with the fitted values in place (λ from a classical fit becomes λ_s with λ_i = 0). */
  function applyTo<
    P extends { lambdaSolvent: number, lambdaInternal: number, vibrationEnergy: number, coupling: number }
  > (params: P): P {
    const r = result.value
    if (!r) return params
    const next = { ...params }
    for (const k of ['lambdaSolvent', 'lambdaInternal', 'vibrationEnergy', 'coupling'] as const) {
      const v = r.parameters[k]
      if (v) next[k] = v.value
    }
    if (r.parameters.lambdaTotal) {
      next.lambdaSolvent = r.parameters.lambdaTotal.value
      next.lambdaInternal = 0
    }
    return next
  }
  return { fitting, result, problem, run, clear, applyTo }
}
