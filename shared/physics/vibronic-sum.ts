/**
 * The semi-classical vibronic sum, taken outward from its largest term with multiplicative recurrences and
 * stopped by a geometric tail bound, under a hard term budget (see bounds.ts). Internal to rates.ts.
 */
import { MAX_VIBRONIC_INDEX, MAX_VIBRONIC_TERMS } from './bounds'
import { LN10 } from './constants'
import { PhysicsInputError } from './errors'

/** Relative size below which the rest of the vibronic sum cannot change a double. */
const TAIL_EPSILON = 2 ** -54

export function budgetExceeded (what: string): never {
  throw new PhysicsInputError([
    { path: '/', message: `The vibronic sum would need ${what}; the inputs are outside what the model can evaluate` }
  ])
}

/** Cached per-parameter tables for the vibronic sum (ln Poisson weights, ln(j+1), ratio factors). */
class VibronicTables {
  lnWeight = new Float64Array(0)
  lnJ1 = new Float64Array(0)
  /** (j+1)/(j+2): how the up-ratio changes from step j to j+1, apart from the Gaussian factor q. */
  upStep = new Float64Array(0)
  constructor (readonly S: number) {
    this.grow(Math.ceil(S + 12 * Math.sqrt(S)) + 24)
  }

  grow (n: number): void {
    const lnS = Math.log(this.S)
    const lw = new Float64Array(n)
    const l1 = new Float64Array(n)
    const us = new Float64Array(n)
    let lnFact = 0
    for (let j = 0; j < n; j++) {
      if (j > 0) lnFact += Math.log(j)
      lw[j] = -this.S + j * lnS - lnFact
      l1[j] = Math.log(j + 1)
      us[j] = (j + 1) / (j + 2)
    }
    this.lnWeight = lw
    this.lnJ1 = l1
    this.upStep = us
  }

  ensure (j: number): void {
    if (j + 2 >= this.lnWeight.length) this.grow(Math.max(2 * this.lnWeight.length, j + 64))
  }
}

/**
 * Tables depend only on S; fits with λ_i and ħω fixed ask for the same S thousands of times,
 * so the last few are kept (a small cache, not shared state: the tables only ever grow).
 */
const tableCache: VibronicTables[] = []
export function tablesFor (S: number): VibronicTables {
  for (const t of tableCache) if (t.S === S) return t
  const t = new VibronicTables(S)
  tableCache.unshift(t)
  if (tableCache.length > 4) tableCache.pop()
  return t
}

/** Constants and tables of one semi-classical parameter set, shared by every call. */
export interface VibronicState {
  ls: number
  h: number
  a: number
  lnA: number
  c1: number
  c2: number
  c3: number
  q: number
  tables: VibronicTables
  /** Index of the largest term at the previous point: the warm start for the next. */
  jStar: number
  termsUsed: number
}

/**
 * The vibronic sum for a run of driving forces, written into `out` as log10 k.
 *
 * The terms T_j = w_j exp[−(ΔG° + λ_s + jħω)²/(4λ_s k_BT)] with Poisson weights
 * w_j = e^(−S) S^j / j! are log-concave in j, so the sum is taken outward from its largest term
 * with multiplicative recurrences (no exp per term), and each direction stops as soon as the
 * geometric bound on the remaining tail falls below 2⁻⁵⁴ of the running sum (under half an ulp,
 * so it cannot change the double) — never a fixed cut-off. The largest term's index is searched
 * from the previous point's, which makes sorted inputs O(1) per point. State lives in locals
 * here (not in a closure) because that keeps V8's hot loop in registers.
 */
export function vibronicRun (dg: ArrayLike<number>, out: Float64Array, st: VibronicState): void {
  const { ls, h, a, lnA, c1, c2, c3, q, tables } = st
  let lw = tables.lnWeight
  let l1 = tables.lnJ1
  let us = tables.upStep
  let cap = lw.length - 2
  let jStar = st.jStar
  let termsUsed = st.termsUsed
  const n = dg.length
  for (let i = 0; i < n; i++) {
    const x = dg[i]! + ls
    // ln(T_{j+1}/T_j) = base − ln(j+1) + c3·j, decreasing in j; the largest term is the first j where it is < 0.
    const base = c1 + c2 * x
    while (jStar > 0 && base - l1[jStar - 1]! + c3 * (jStar - 1) < 0) jStar--
    while (base - l1[jStar]! + c3 * jStar >= 0) {
      if (jStar >= MAX_VIBRONIC_INDEX) budgetExceeded(`a dominant term beyond j = ${MAX_VIBRONIC_INDEX}`)
      if (++jStar >= cap) {
        tables.ensure(jStar)
        lw = tables.lnWeight
        l1 = tables.lnJ1
        us = tables.upStep
        cap = lw.length - 2
      }
    }
    const y = x + jStar * h
    const lnMax = lw[jStar]! - (y * y) / a
    const rUp0 = Math.exp(base - l1[jStar]! + c3 * jStar)
    let sum = 1
    let used = 1
    // Upward: T_{j+1} = T_j · r_j, and r_{j+1} = r_j · q · (j+1)/(j+2).
    let t = 1
    let r = rUp0
    let j = jStar
    for (;;) {
      t *= r
      sum += t
      if (++used > MAX_VIBRONIC_TERMS) budgetExceeded(`more than ${MAX_VIBRONIC_TERMS} terms`)
      if (++j >= cap) {
        tables.ensure(j)
        lw = tables.lnWeight
        l1 = tables.lnJ1
        us = tables.upStep
        cap = lw.length - 2
      }
      r *= q * us[j - 1]!
      if (t * r < TAIL_EPSILON * (1 - r) * sum) break
    }
    // Downward: T_{j−1} = T_j · d_j with d_j = 1/r_{j−1} = q · j/(j+1) / r_j, and d_{j−1} = d_j · q · (j−1)/j.
    if (jStar > 0) {
      t = 1
      // d_{j*} from r_{j*} unless r_{j*} underflowed (then directly: one more exp, only in that corner).
      let d = rUp0 > 1e-290 ? (q * us[jStar - 1]!) / rUp0 : Math.exp(-(base - l1[jStar - 1]! + c3 * (jStar - 1)))
      j = jStar
      for (;;) {
        t *= d
        sum += t
        if (++used > MAX_VIBRONIC_TERMS) budgetExceeded(`more than ${MAX_VIBRONIC_TERMS} terms`)
        if (--j === 0) break
        d *= q * us[j - 1]!
        if (t * d < TAIL_EPSILON * (1 - d) * sum) break
      }
    }
    if (used > termsUsed) termsUsed = used
    out[i] = (lnA + lnMax + Math.log(sum)) / LN10
  }
  st.jStar = jStar
  st.termsUsed = termsUsed
}
