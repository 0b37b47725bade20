/**
 * The bounded Levenberg–Marquardt run from one start (projected steps, an active set, one-sided differences at
 * a bound), its convergence tests, and the covariance of the reduced problem. See fit.ts for why it is our own.
 */
import { solve, Matrix } from 'ml-matrix'

/**
 * A weighted least-squares problem as the optimizer sees it: data, weights 1/σ, a box, and the model. Both the
 * rate-model fits (fit-problem.ts) and the decay fits (decay-fit.ts) are put in this shape, so that one
 * optimizer, one set of convergence tests and one covariance serve both.
 */
export interface LsqProblem {
  n: number
  y: Float64Array
  w: Float64Array
  lo: ArrayLike<number>
  hi: ArrayLike<number>
  /** The model at the parameter vector, written into f. */
  evaluate: (vec: ArrayLike<number>, f: Float64Array) => void
  /** The size below which a parameter's finite-difference step does not shrink with its value. */
  stepFloor: (j: number) => number
}
type Problem = LsqProblem

function chiSquared (prob: Problem, f: Float64Array): number {
  let chi = 0
  for (let i = 0; i < prob.n; i++) {
    const r = (prob.y[i]! - f[i]!) * prob.w[i]!
    chi += r * r
  }
  return chi
}
function model (prob: Problem, vec: ArrayLike<number>, f: Float64Array): void {
  prob.evaluate(vec, f)
}

export interface Run {
  vec: number[]
  chi: number
  iterations: number
  status: 'converged' | 'stalled'
  active: boolean[]
}

/** Relative finite-difference step for each free parameter, not below the problem's floor for it. */
function stepFor (prob: Problem, vec: number[], j: number, rel: number): number {
  return rel * Math.max(Math.abs(vec[j]!), prob.stepFloor(j))
}

/**
 * Jacobian of the weighted model, w_i ∂f_i/∂v_j, by finite differences that never leave the box:
 * central where both neighbours are inside, one-sided inward at a bound.
 */
export function jacobian (
  prob: Problem,
  vec: number[],
  f0: Float64Array,
  central: boolean,
  J: Float64Array[],
  tmp: Float64Array,
  tmp2: Float64Array
): number {
  let evals = 0
  for (let j = 0; j < vec.length; j++) {
    const h = stepFor(prob, vec, j, central ? 1e-5 : 1e-7)
    const up = vec[j]! + h <= prob.hi[j]!
    const dn = vec[j]! - h >= prob.lo[j]!
    const Jj = J[j]!
    if (central && up && dn) {
      const a = vec.slice()
      a[j] = vec[j]! + h
      model(prob, a, tmp)
      const b = vec.slice()
      b[j] = vec[j]! - h
      model(prob, b, tmp2)
      for (let i = 0; i < prob.n; i++) Jj[i] = (prob.w[i]! * (tmp[i]! - tmp2[i]!)) / (2 * h)
      evals += 2
    }
    else {
      const s = up ? h : -h
      const a = vec.slice()
      a[j] = vec[j]! + s
      model(prob, a, tmp)
      for (let i = 0; i < prob.n; i++) Jj[i] = (prob.w[i]! * (tmp[i]! - f0[i]!)) / s
      evals++
    }
  }
  return evals
}

const GTOL = 1e-6
const MAX_ITERATIONS = 300

/** Bounded Levenberg–Marquardt from one start. */
export function lmRun (prob: Problem, start: number[]): Run {
  const k = start.length
  const n = prob.n
  let vec = start.slice()
  const f = new Float64Array(n)
  const ft = new Float64Array(n)
  const tmp = new Float64Array(n)
  const tmp2 = new Float64Array(n)
  const J = Array.from({ length: k }, () => new Float64Array(n))
  model(prob, vec, f)
  let chi = chiSquared(prob, f)
  let mu = -1
  let iterations = 0
  let active = new Array<boolean>(k).fill(false)
  let status: Run['status'] = 'stalled'
  const r = new Float64Array(n)
  while (iterations < MAX_ITERATIONS) {
    iterations++
    for (let i = 0; i < n; i++) r[i] = (prob.y[i]! - f[i]!) * prob.w[i]!
    jacobian(prob, vec, f, false, J, tmp, tmp2)
    // normal equations A = JᵀJ, b = Jᵀr (b is minus half the gradient of χ²)
    const A = Array.from({ length: k }, () => new Array<number>(k).fill(0))
    const b = new Array<number>(k).fill(0)
    for (let a = 0; a < k; a++) {
      const Ja = J[a]!
      let s = 0
      for (let i = 0; i < n; i++) s += Ja[i]! * r[i]!
      b[a] = s
      for (let c = a; c < k; c++) {
        const Jc = J[c]!
        let t = 0
        for (let i = 0; i < n; i++) t += Ja[i]! * Jc[i]!
        A[a]![c] = t
        A[c]![a] = t
      }
    }
    // active set: held at a bound by a gradient that points outward
    active = vec.map((v, j) => (v <= prob.lo[j]! && b[j]! < 0) || (v >= prob.hi[j]! && b[j]! > 0))
    const freeIdx = [...Array(k).keys()].filter(j => !active[j] && A[j]![j]! > 0)
    // gradient test on the free columns: cosine between the residual and each column
    const rn = Math.sqrt(chi)
    let cos = 0
    for (const j of freeIdx) cos = Math.max(cos, Math.abs(b[j]!) / (Math.sqrt(A[j]![j]!) * rn || 1))
    if (chi <= 1e-26 * n || freeIdx.length === 0 || cos <= GTOL) {
      status = 'converged'
      break
    }
    if (mu < 0) mu = 1e-3 * Math.max(...freeIdx.map(j => A[j]![j]!))
    let accepted = false
    for (let tries = 0; tries < 30; tries++) {
      const m = freeIdx.length
      const M = new Matrix(m, m)
      const rhs = new Matrix(m, 1)
      freeIdx.forEach((ja, a) => {
        freeIdx.forEach((jc, c) => M.set(a, c, A[ja]![jc]! + (a === c ? mu * Math.max(A[ja]![ja]!, 1e-12) : 0)))
        rhs.set(a, 0, b[ja]!)
      })
      let delta: Matrix
      try {
        delta = solve(M, rhs)
      }
      catch {
        mu *= 10
        continue
      }
      const trial = vec.slice()
      freeIdx.forEach((j, a) => {
        trial[j] = Math.min(Math.max(vec[j]! + delta.get(a, 0), prob.lo[j]!), prob.hi[j]!)
      })
      model(prob, trial, ft)
      const tchi = chiSquared(prob, ft)
      if (Number.isFinite(tchi) && tchi < chi) {
        const dChi = chi - tchi
        let step = 0
        for (let j = 0; j < k; j++) step = Math.max(step, Math.abs(trial[j]! - vec[j]!) / (Math.abs(vec[j]!) + 1e-3))
        vec = trial
        chi = tchi
        f.set(ft)
        mu = Math.max(mu / 3, 1e-12)
        accepted = true
        // χ² and the step have stopped moving: take it as converged only if the gradient is also small
        // (a looser test: with finite differences the last digits of the gradient are noise)
        if (dChi <= 1e-12 * chi && step <= 1e-9) {
          status = 'stalled'
          const cosNow = gradientCosine(prob, vec, f, active, J, tmp, tmp2)
          if (cosNow <= 1e-3) status = 'converged'
          return { vec, chi, iterations, status, active: activeAt(prob, vec, f, J, tmp, tmp2) }
        }
        break
      }
      mu *= 4
      if (mu > 1e16) break
    }
    if (!accepted) {
      // no step lowers χ²: a minimum if the gradient says so, otherwise stalled
      const cosNow = gradientCosine(prob, vec, f, active, J, tmp, tmp2)
      status = cosNow <= 1e-3 ? 'converged' : 'stalled'
      break
    }
  }
  return { vec, chi, iterations, status, active: activeAt(prob, vec, f, J, tmp, tmp2) }
}

/** Largest gradient cosine over the columns not held at a bound, from a central-difference Jacobian. */
function gradientCosine (
  prob: Problem,
  vec: number[],
  f: Float64Array,
  active: boolean[],
  J: Float64Array[],
  tmp: Float64Array,
  tmp2: Float64Array
): number {
  jacobian(prob, vec, f, true, J, tmp, tmp2)
  const chi = chiSquared(prob, f)
  let cos = 0
  for (let j = 0; j < vec.length; j++) {
    if (active[j]) continue
    let b = 0
    let a = 0
    for (let i = 0; i < prob.n; i++) {
      b += J[j]![i]! * (prob.y[i]! - f[i]!) * prob.w[i]!
      a += J[j]![i]! ** 2
    }
    if (a > 0) cos = Math.max(cos, Math.abs(b) / Math.sqrt(a * chi || 1))
  }
  return cos
}

/** Which parameters sit at a bound with the gradient pushing outward. */
function activeAt (
  prob: Problem,
  vec: number[],
  f: Float64Array,
  J: Float64Array[],
  tmp: Float64Array,
  tmp2: Float64Array
): boolean[] {
  jacobian(prob, vec, f, false, J, tmp, tmp2)
  return vec.map((v, j) => {
    const atLo = v <= prob.lo[j]! + 1e-12 * Math.max(1, Math.abs(v))
    const atHi = v >= prob.hi[j]! - 1e-12 * Math.max(1, Math.abs(v))
    if (!atLo && !atHi) return false
    let b = 0
    for (let i = 0; i < prob.n; i++) b += J[j]![i]! * (prob.y[i]! - f[i]!) * prob.w[i]!
    return (atLo && b <= 0) || (atHi && b >= 0)
  })
}

/**
 * Diagonal of (JᵀWJ)⁻¹ over the parameters that are neither held at a bound nor without effect
 * (central differences, inward at a bound); null entries where the reduced matrix is singular.
 */
export function covariance (
  prob: Problem,
  vec: number[],
  active: boolean[]
): { cov: number[] | null, noEffect: boolean[] } {
  const n = prob.n
  const k = vec.length
  const f = new Float64Array(n)
  const tmp = new Float64Array(n)
  const tmp2 = new Float64Array(n)
  model(prob, vec, f)
  const J = Array.from({ length: k }, () => new Float64Array(n))
  jacobian(prob, vec, f, true, J, tmp, tmp2)
  const norms = J.map(c => Math.sqrt(c.reduce((s, v) => s + v * v, 0)))
  const maxNorm = Math.max(...norms, 0)
  const noEffect = norms.map(v => !(v > 1e-9 * Math.max(maxNorm, 1e-300)) || v === 0)
  const keep = [...Array(k).keys()].filter(j => !active[j] && !noEffect[j])
  const out = new Array<number>(k).fill(NaN)
  if (!keep.length) return { cov: out, noEffect }
  const A = new Matrix(keep.length, keep.length)
  keep.forEach((a, i) =>
    keep.forEach((c, j) => {
      let s = 0
      for (let t = 0; t < n; t++) s += J[a]![t]! * J[c]![t]!
      A.set(i, j, s)
    })
  )
  // scale to unit diagonal before inverting so that the test for singularity is about correlation, not units
  const d = keep.map((_, i) => Math.sqrt(A.get(i, i)))
  const C = new Matrix(keep.length, keep.length)
  keep.forEach((_, i) => keep.forEach((__, j) => C.set(i, j, A.get(i, j) / (d[i]! * d[j]!))))
  try {
    const inv = solve(C, Matrix.eye(keep.length))
    keep.forEach((j, i) => {
      const v = inv.get(i, i)
      // a correlation matrix whose inverse has a diagonal above 1e10 is singular to working precision
      out[j] = v > 0 && v < 1e10 ? v / (d[i]! * d[i]!) : NaN
    })
  }
  catch {
    /* singular: every entry stays NaN */
  }
  return { cov: out, noEffect }
}
