/**
 * Straight-line analyses the compare view offers: distance decay (β) and temperature series
 * (Arrhenius and the Marcus form ln(k·T^½) vs 1/T).
 */
import { BOLTZMANN_EV_PER_K } from './constants'
import { IssueCollector } from './errors'

export interface LineFit {
  slope: number
  intercept: number
  slopeStderr: number
  interceptStderr: number
  rSquared: number
  n: number
}

/**
 * Ordinary least-squares line with standard errors from the residual variance (n − 2 degrees of
 * freedom). Kept here because the regression packages on npm return the line without its
 * standard errors, which every analysis below reports.
 */
export function fitLine (x: ArrayLike<number>, y: ArrayLike<number>): LineFit {
  const n = x.length
  const c = new IssueCollector()
  if (n !== y.length) c.add('/points', 'x and y must have the same length')
  if (n < 3) c.add('/points', 'At least three points are needed for a line with uncertainties')
  c.throwIfAny()
  let mx = 0
  let my = 0
  for (let i = 0; i < n; i++) {
    mx += x[i]!
    my += y[i]!
  }
  mx /= n
  my /= n
  let sxx = 0
  let sxy = 0
  let syy = 0
  for (let i = 0; i < n; i++) {
    const dx = x[i]! - mx
    const dy = y[i]! - my
    sxx += dx * dx
    sxy += dx * dy
    syy += dy * dy
  }
  if (sxx === 0) {
    c.add('/points', 'All x values are equal: no slope can be determined')
    c.throwIfAny()
  }
  const slope = sxy / sxx
  const intercept = my - slope * mx
  let ssr = 0
  for (let i = 0; i < n; i++) {
    const r = y[i]! - (intercept + slope * x[i]!)
    ssr += r * r
  }
  const s2 = ssr / (n - 2)
  let sumX2 = 0
  for (let i = 0; i < n; i++) sumX2 += x[i]! ** 2
  return {
    slope,
    intercept,
    slopeStderr: Math.sqrt(s2 / sxx),
    interceptStderr: Math.sqrt((s2 * sumX2) / (n * sxx)),
    rSquared: syy === 0 ? 1 : 1 - ssr / syy,
    n
  }
}

export interface RatePoint {
  rate: number
}

function logRates (points: { rate: number }[], c: IssueCollector): number[] {
  return points.map((p, i) => {
    c.positive(p.rate, `/points/${i}/rate`, 'Rate')
    return Math.log(p.rate)
  })
}

/** Distance decay k = k₀ exp(−βR): β (Å⁻¹) from ln k against R (Å). */
export function distanceDecay (points: { distance: number, rate: number }[]) {
  const c = new IssueCollector()
  const y = logRates(points, c)
  const x = points.map((p, i) => {
    c.positive(p.distance, `/points/${i}/distance`, 'Distance')
    return p.distance
  })
  c.throwIfAny()
  const line = fitLine(x, y)
  return { beta: -line.slope, betaStderr: line.slopeStderr, lnK0: line.intercept, rSquared: line.rSquared, n: line.n }
}

/**
 * Temperature series. Arrhenius: ln k = ln A − E_a/(k_B T). Marcus form: ln(k T^½) = const − ΔG‡/(k_B T),
 * because the classical prefactor carries T^(−½). Energies in eV.
 */
export function temperatureSeries (points: { temperatureK: number, rate: number }[]) {
  const c = new IssueCollector()
  const lnk = logRates(points, c)
  const invT = points.map((p, i) => {
    c.positive(p.temperatureK, `/points/${i}/temperatureK`, 'Temperature')
    return 1 / p.temperatureK
  })
  c.throwIfAny()
  const arr = fitLine(invT, lnk)
  const marcus = fitLine(
    invT,
    lnk.map((v, i) => v + 0.5 * Math.log(points[i]!.temperatureK))
  )
  return {
    arrhenius: {
      activationEnergy: -arr.slope * BOLTZMANN_EV_PER_K,
      activationEnergyStderr: arr.slopeStderr * BOLTZMANN_EV_PER_K,
      lnPrefactor: arr.intercept,
      rSquared: arr.rSquared
    },
    marcus: {
      activationFreeEnergy: -marcus.slope * BOLTZMANN_EV_PER_K,
      activationFreeEnergyStderr: marcus.slopeStderr * BOLTZMANN_EV_PER_K,
      intercept: marcus.intercept,
      rSquared: marcus.rSquared
    }
  }
}
