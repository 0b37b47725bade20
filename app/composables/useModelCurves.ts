/**
 * Classical and semi-classical curves (and, on request, the vibronic terms) over a range of driving forces,
 * recomputed in the browser with the same shared physics the server uses; shared by Compare and Rate models.
 * Parameters outside the model's bounds give no curve and a sentence saying why.
 */
import {
  classicalLog10Rates,
  semiclassicalLog10Rates,
  semiclassicalTerms,
  PhysicsInputError,
  type SemiclassicalParams
} from '#shared/physics'
import { CURVE_COLORS } from '#shared/plot-palette'

export interface Curve {
  name: string
  color: string
  points: { deltaG: number, log10Rate: number }[]
  dash?: string
}

export function useModelCurves (
  params: () => SemiclassicalParams,
  deltaGs: () => number[],
  opts: { classical: () => boolean, terms?: () => boolean, classicalName?: string }
) {
  const result = computed((): { curves: Curve[], error: string } => {
    const p = params()
    const dg = deltaGs()
    const line = (ys: ArrayLike<number>) => dg.map((d, i) => ({ deltaG: d, log10Rate: ys[i]! }))
    try {
      const out: Curve[] = [
        {
          name: 'semi-classical',
          color: CURVE_COLORS.semiclassical,
          points: line(semiclassicalLog10Rates(dg, p).log10Rate)
        }
      ]
      if (opts.classical()) {
        const cl = classicalLog10Rates(dg, {
          lambdaTotal: p.lambdaSolvent + p.lambdaInternal,
          coupling: p.coupling,
          temperatureK: p.temperatureK
        })
        out.push({
          name: opts.classicalName ?? 'classical',
          color: CURVE_COLORS.classical,
          points: line(cl.log10Rate),
          dash: '5,3'
        })
      }
      if (opts.terms?.()) {
        for (const t of semiclassicalTerms(dg, p, { minWeight: 0.01, maxTerms: 12 }))
          out.push({ name: `j = ${t.j}`, color: '#9aa7ad', points: line(t.log10Rate), dash: '2,3' })
      }
      return { curves: out, error: '' }
    }
    catch (e) {
      return { curves: [], error: e instanceof PhysicsInputError ? e.message : String(e) }
    }
  })
  return { curves: computed(() => result.value.curves), error: computed(() => result.value.error) }
}
