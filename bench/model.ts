/** Science-core benchmarks: curve throughput and fit latency (one core, full accuracy). */
import { fitRates, semiclassicalLog10Rates } from '../shared/physics'
import { report } from './report'

const p = { lambdaSolvent: 0.6, lambdaInternal: 0.36, vibrationEnergy: 0.18, coupling: 0.005, temperatureK: 298.15 }

export function curveBench (): void {
  const N = 1_000_000
  const dg = new Float64Array(N)
  for (let i = 0; i < N; i++) dg[i] = -2.5 + 3 * i / (N - 1)
  semiclassicalLog10Rates(dg.subarray(0, 50_000), p) // warm-up
  const times: number[] = []
  for (let k = 0; k < 5; k++) {
    const t = performance.now()
    semiclassicalLog10Rates(dg, p)
    times.push(performance.now() - t)
  }
  times.sort((a, b) => a - b)
  report('model.curve.points_per_second', N / (times[2]! / 1000), '1/s', 1e7)
}

function fitCase (n: number) {
  const truth = { lambdaSolvent: 0.7, lambdaInternal: 0.4, vibrationEnergy: 0.186, coupling: 0.004, temperatureK: 295 }
  const dg = Array.from({ length: n }, (_, i) => -2.2 + 2.4 * i / (n - 1))
  const y = semiclassicalLog10Rates(dg, truth).log10Rate
  // deterministic "noise" so every run fits the same problem
  const points = dg.map((d, i) => ({ deltaG: d, log10Rate: y[i]! + 0.1 * Math.sin(i * 12.9898), log10RateUncertainty: 0.1 }))
  return { model: 'semiclassical' as const, temperatureK: 295, points, fixed: { lambdaInternal: 0.4, vibrationEnergy: 0.186 } }
}

function medianMs (fn: () => void, runs: number): number {
  for (let i = 0; i < Math.min(5, runs); i++) fn()
  const t: number[] = []
  for (let i = 0; i < runs; i++) { const s = performance.now(); fn(); t.push(performance.now() - s) }
  t.sort((a, b) => a - b)
  return t[Math.floor(runs / 2)]!
}

export function fitBench (): void {
  const small = fitCase(28)
  report('model.fit28.median_ms', medianMs(() => fitRates(small), 200), 'ms', 2)
  const large = fitCase(5000)
  report('model.fit5000.median_ms', medianMs(() => fitRates(large), 15), 'ms', 200)
}
