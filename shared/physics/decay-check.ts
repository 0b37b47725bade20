/** Checks of a decay-fit request: every problem named by its JSON pointer and point index; nothing is fitted on bad input. */
import { IssueCollector } from './errors'
import {
  parameterNames,
  TIME_UNITS,
  type DecayModelName,
  type DecayParam,
  type IrfKind,
  type TimeUnit,
  type Weighting
} from './decay'

/** Points one trace may hold (a fit costs about 1 µs per point and evaluation). */
export const MAX_TRACE_POINTS = 100_000
export const MIN_TRACE_POINTS = 10
/** Samples of a measured response. */
export const MAX_IRF_POINTS = 2000

export interface DecayFitRequest {
  model: DecayModelName
  times: number[]
  signal: number[]
  /** σ per point, for weighting 'given'. */
  sigma?: number[]
  timeUnit: TimeUnit
  /** poisson: σ² = max(y, 1) (counts); given: the sigma column; none: equal weights, errors scaled by χ²_red. */
  weighting?: Weighting
  irf?: { kind: 'none' } | { kind: 'gaussian', fwhm?: number } | { kind: 'measured', times: number[], signal: number[] }
  /** Values held fixed (time zero without a response defaults to 0). */
  fixed?: Partial<Record<DecayParam, number>>
  initial?: Partial<Record<DecayParam, number>>
  bounds?: Partial<Record<DecayParam, [number, number]>>
}

function checkSeries (c: IssueCollector, xs: unknown, path: string, label: string, n?: number): xs is number[] {
  if (!Array.isArray(xs)) {
    c.add(path, `${label} must be an array of numbers`)
    return false
  }
  if (n !== undefined && xs.length !== n) {
    c.add(path, `${label} has ${xs.length} values for ${n} times`)
    return false
  }
  const bad = xs.findIndex(v => typeof v !== 'number' || !Number.isFinite(v))
  if (bad >= 0) {
    c.add(`${path}/${bad}`, `${label} at point ${bad + 1} is not a finite number (${String(xs[bad]).slice(0, 20)})`)
    return false
  }
  return true
}

function checkTimes (c: IssueCollector, t: number[], path: string, label: string): void {
  for (let i = 1; i < t.length; i++) {
    if (!(t[i]! > t[i - 1]!)) {
      c.add(
        `${path}/${i}`,
        `${label} must increase: point ${i + 1} (${t[i]}) is not after point ${i} (${t[i - 1]}); sort the trace`
      )
      return
    }
  }
}

/** Every problem of the request at once (PhysicsInputError), or the request's irf kind and weighting. */
export function checkDecayRequest (req: DecayFitRequest): { irf: IrfKind, weighting: Weighting } {
  const c = new IssueCollector()
  if (req.model !== 'mono' && req.model !== 'bi') c.add('/model', 'Model must be "mono" or "bi"')
  if (!(req.timeUnit in TIME_UNITS)) c.add('/timeUnit', `Time unit must be one of ${Object.keys(TIME_UNITS).join(', ')}`)
  const weighting = req.weighting ?? 'none'
  if (!['poisson', 'given', 'none'].includes(weighting)) c.add('/weighting', 'Weighting must be "poisson", "given" or "none"')
  const irf = (req.irf?.kind ?? 'none') as IrfKind
  if (!['none', 'gaussian', 'measured'].includes(irf))
    c.add('/irf/kind', 'The instrument response must be "none", "gaussian" or "measured"')
  c.throwIfAny()
  if (checkSeries(c, req.times, '/times', 'Time')) {
    if (req.times.length < MIN_TRACE_POINTS)
      c.add('/times', `A trace needs at least ${MIN_TRACE_POINTS} points; it has ${req.times.length}`)
    else if (req.times.length > MAX_TRACE_POINTS)
      c.add(
        '/times',
        `A trace holds at most ${MAX_TRACE_POINTS.toLocaleString('en')} points; it has ${req.times.length.toLocaleString('en')}`
      )
    else checkTimes(c, req.times, '/times', 'Time')
  }
  c.throwIfAny()
  const n = req.times.length
  if (checkSeries(c, req.signal, '/signal', 'Signal', n)) {
    const first = req.signal[0]!
    if (req.signal.every(v => v === first))
      c.add('/signal', `The signal is constant (${first} at every point): there is no decay to fit`)
    if (weighting === 'poisson') {
      const neg = req.signal.findIndex(v => v < 0)
      if (neg >= 0) c.add(`/signal/${neg}`, `Poisson weights need counts ≥ 0; point ${neg + 1} is ${req.signal[neg]}`)
    }
  }
  if (weighting === 'given') {
    if (req.sigma === undefined) c.add('/sigma', 'Weighting "given" needs a σ for every point')
    else if (checkSeries(c, req.sigma, '/sigma', 'σ', n)) {
      const bad = req.sigma.findIndex(v => !(v > 0))
      if (bad >= 0) c.add(`/sigma/${bad}`, `σ at point ${bad + 1} must be > 0 (it is ${req.sigma[bad]})`)
    }
  }
  if (req.irf?.kind === 'gaussian' && req.irf.fwhm !== undefined && !(typeof req.irf.fwhm === 'number' && req.irf.fwhm > 0))
    c.add('/irf/fwhm', 'The response width (FWHM) must be a number > 0 in the trace\'s time unit')
  if (req.irf?.kind === 'measured') {
    const m = req.irf
    if (checkSeries(c, m.times, '/irf/times', 'Response time')) {
      if (m.times.length < 5 || m.times.length > MAX_IRF_POINTS)
        c.add('/irf/times', `A measured response needs 5 to ${MAX_IRF_POINTS} samples; it has ${m.times.length}`)
      else checkTimes(c, m.times, '/irf/times', 'Response time')
      if (checkSeries(c, m.signal, '/irf/signal', 'Response signal', m.times.length)) {
        if (!m.signal.some(v => v > 0)) c.add('/irf/signal', 'The measured response has no positive sample')
      }
    }
  }
  const names = parameterNames(req.model, irf)
  for (const key of ['fixed', 'initial', 'bounds'] as const) {
    for (const [k, v] of Object.entries(req[key] ?? {})) {
      if (!names.includes(k as DecayParam))
        c.add(`/${key}/${k}`, `Not a parameter of this model; expected one of ${names.join(', ')}`)
      else if (key === 'bounds') {
        const b = v as unknown
        if (!Array.isArray(b) || b.length !== 2 || !b.every(Number.isFinite) || !(b[0] < b[1]))
          c.add(`/bounds/${k}`, 'Bounds must be [lower, upper] with lower < upper')
      }
      else if (typeof v !== 'number' || !Number.isFinite(v)) c.add(`/${key}/${k}`, 'Must be a finite number')
      else if ((k.startsWith('tau') || k === 'irfFwhm') && v <= 0) c.add(`/${key}/${k}`, 'Must be > 0')
    }
  }
  c.throwIfAny()
  return { irf, weighting }
}
