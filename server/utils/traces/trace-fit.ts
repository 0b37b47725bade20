/** Fitting an attached trace, and taking a record's rate from the fit (with the fit kept as the record's provenance). */
import { and, eq } from 'drizzle-orm'
import { fitDecay, type DecayFitResult } from '../../../shared/physics/decay-fit'
import { TIME_UNITS, type DecayParam } from '../../../shared/physics/decay'
import type { DecayFitRef, RateProvenance, RateRecordV1, TraceRef } from '../../../shared/records/types'
import { rethrowPhysics, httpError } from '../http/errors'
import { schema, useDb } from '../storage/db'
import type { Viewer } from '../accounts/auth'
import { checkRecords } from '../deposit/check'
import { ingestContext, recordValidator, replaceRecord } from '../deposit/drafts'
import { readTrace } from './traces'

const PARAM = { type: 'number' }
const PARAMS = {
  type: 'object',
  additionalProperties: false,
  properties: Object.fromEntries(['a1', 'tau1', 'a2', 'tau2', 'offset', 't0', 'irfFwhm'].map(k => [k, PARAM]))
}
/** How to fit a trace (the data come from the stored trace). */
export const TRACE_FIT_OPTIONS = {
  type: 'object',
  additionalProperties: false,
  required: ['model'],
  properties: {
    model: { enum: ['mono', 'bi'] },
    weighting: {
      enum: ['poisson', 'given', 'none'],
      description: 'default: given when the trace has σ, else poisson for emission, none otherwise'
    },
    irf: {
      type: 'object',
      additionalProperties: false,
      required: ['kind'],
      properties: {
        kind: { enum: ['none', 'gaussian', 'measured'] },
        fwhm: {
          type: 'number',
          exclusiveMinimum: 0,
          description: 'Gaussian response width, in the trace\'s time unit (fitted when left out)'
        },
        traceId: { type: 'integer', minimum: 1, description: 'the measured response: another trace of the same dataset' }
      }
    },
    fixed: PARAMS,
    initial: PARAMS,
    bounds: {
      type: 'object',
      additionalProperties: false,
      properties: Object.fromEntries(
        ['a1', 'tau1', 'a2', 'tau2', 'offset', 't0', 'irfFwhm'].map(k => [
          k,
          { type: 'array', items: PARAM, minItems: 2, maxItems: 2 }
        ])
      )
    }
  }
}
export interface TraceFitOptions {
  model: 'mono' | 'bi'
  weighting?: 'poisson' | 'given' | 'none'
  irf?: { kind: 'none' | 'gaussian' | 'measured', fwhm?: number, traceId?: number }
  fixed?: Partial<Record<DecayParam, number>>
  initial?: Partial<Record<DecayParam, number>>
  bounds?: Partial<Record<DecayParam, [number, number]>>
}
export const RATE_FROM_TRACE_BODY = {
  type: 'object',
  additionalProperties: false,
  required: ['traceId', 'fit'],
  properties: {
    traceId: { type: 'integer', minimum: 1 },
    fit: TRACE_FIT_OPTIONS,
    component: {
      enum: ['tau1', 'tau2'],
      description: 'the lifetime k is taken from (default tau1; of a bi-exponential, tau1 is the shorter)'
    },
    reference: {
      type: 'object',
      additionalProperties: false,
      required: ['traceId', 'fit'],
      description: 'the donor without acceptor: then k_ET = 1/τ − 1/τ_ref',
      properties: { traceId: { type: 'integer', minimum: 1 }, fit: TRACE_FIT_OPTIONS, component: { enum: ['tau1', 'tau2'] } }
    }
  }
}

type Trace = Awaited<ReturnType<typeof readTrace>>

/** Fits a stored trace; a measured response must be a trace of the same dataset. */
export async function fitTrace (
  viewer: Viewer | null,
  t: Trace,
  o: TraceFitOptions,
  at = ''
): Promise<{ result: DecayFitResult, irfSha256?: string }> {
  let irf: Parameters<typeof fitDecay>[0]['irf'] = { kind: 'none' }
  let irfSha256: string | undefined
  if (o.irf?.kind === 'gaussian') irf = { kind: 'gaussian', fwhm: o.irf.fwhm }
  if (o.irf?.kind === 'measured') {
    if (!o.irf.traceId)
      throw httpError(422, 'A measured response names its trace', [{ path: `${at}/irf/traceId`, message: 'is required' }])
    const r = await readTrace(viewer, o.irf.traceId)
    if (r.datasetId !== t.datasetId)
      throw httpError(422, 'The measured response must be a trace of the same dataset', [
        { path: `${at}/irf/traceId`, message: 'another dataset\'s trace' }
      ])
    if (r.timeUnit !== t.timeUnit)
      throw httpError(422, `The response is in ${r.timeUnit} and the trace in ${t.timeUnit}`, [
        { path: `${at}/irf/traceId`, message: 'time units differ' }
      ])
    irf = { kind: 'measured', times: r.points.times, signal: r.points.signal }
    irfSha256 = r.sha256
  }
  const weighting = o.weighting ?? (t.hasSigma ? 'given' : t.signalKind === 'emission' ? 'poisson' : 'none')
  if (weighting === 'given' && !t.hasSigma)
    throw httpError(422, 'The trace has no σ column to weight by', [{ path: `${at}/weighting`, message: 'no σ in the trace' }])
  try {
    const result = fitDecay({
      model: o.model,
      times: t.points.times,
      signal: t.points.signal,
      sigma: t.points.sigma,
      timeUnit: t.timeUnit,
      weighting,
      irf,
      fixed: o.fixed,
      initial: o.initial,
      bounds: o.bounds
    })
    return { result, irfSha256 }
  }
  catch (e) {
    rethrowPhysics(e, at)
  }
}

export const traceRef = (t: Trace): TraceRef => ({
  sha256: t.sha256,
  file: t.name,
  timeUnit: t.timeUnit,
  signal: t.signalKind,
  points: t.pointCount,
  ...(t.wavelengthNm !== null ? { wavelengthNm: t.wavelengthNm } : {})
})
function fitRef (r: DecayFitResult, component: 'tau1' | 'tau2', irfSha256?: string): DecayFitRef {
  return {
    model: r.model,
    irf: r.irf,
    ...(irfSha256 ? { irfSha256 } : {}),
    weighting: r.weighting,
    component,
    parameters: Object.fromEntries(
      Object.entries(r.parameters).map(([k, p]) => [k, { value: p.value, stderr: p.stderr, fixed: p.fixed }])
    ),
    chiSquaredReduced: r.chiSquaredReduced,
    status: r.status
  }
}

/** The lifetime a component names, in seconds, with its standard error; 422 when the fit cannot give one. */
function lifetimeOf (r: DecayFitResult, component: 'tau1' | 'tau2', at: string): { tau: number, se: number } {
  if (r.status === 'stalled')
    throw httpError(422, 'The fit did not converge; no rate is taken from it', [{ path: `${at}/fit`, message: 'fit stalled' }])
  const l = r.lifetimes.find(x => x.name === component)
  if (!l)
    throw httpError(422, `A ${r.model}-exponential fit has no ${component}`, [
      { path: `${at}/component`, message: 'no such lifetime' }
    ])
  if (l.stderr === null)
    throw httpError(422, `${component} has no standard error: the trace does not constrain it`, [
      { path: `${at}/component`, message: 'unconstrained' }
    ])
  const s = TIME_UNITS[r.timeUnit]
  return { tau: l.value * s, se: l.stderr * s }
}

/**
 * Fits the trace (and the reference), derives k = 1/τ or k_ET = 1/τ − 1/τ_ref with first-order error
 * propagation, and writes rate and provenance into the draft's record through the ordinary record checks.
 */
export async function rateFromTrace (
  viewer: Viewer,
  datasetId: number,
  versionId: number,
  recordId: number,
  b: {
    traceId: number
    fit: TraceFitOptions
    component?: 'tau1' | 'tau2'
    reference?: { traceId: number, fit: TraceFitOptions, component?: 'tau1' | 'tau2' }
  }
) {
  const db = await useDb()
  const [rec] = await db
    .select()
    .from(schema.rateRecords)
    .where(and(eq(schema.rateRecords.id, recordId), eq(schema.rateRecords.versionId, versionId)))
  if (!rec) throw httpError(404, 'No such record in this draft')
  const trace = await readTrace(viewer, b.traceId)
  if (trace.datasetId !== datasetId)
    throw httpError(422, 'The trace belongs to another dataset', [{ path: '/traceId', message: 'another dataset\'s trace' }])
  const main = await fitTrace(viewer, trace, b.fit, '/fit')
  const component = b.component ?? 'tau1'
  const { tau, se } = lifetimeOf(main.result, component, '')
  let value = 1 / tau
  let variance = (se / (tau * tau)) ** 2
  const provenance: RateProvenance = {
    trace: traceRef(trace),
    fit: fitRef(main.result, component, main.irfSha256),
    derivation: 'k = 1/τ'
  }
  const rate: RateRecordV1['rate'] = { value, uncertainty: 0, kind: 'unimolecular', method: 'direct' }
  let refFit: DecayFitResult | undefined
  if (b.reference) {
    const ref = await readTrace(viewer, b.reference.traceId)
    if (ref.datasetId !== datasetId)
      throw httpError(422, 'The reference trace belongs to another dataset', [
        { path: '/reference/traceId', message: 'another dataset\'s trace' }
      ])
    const rf = await fitTrace(viewer, ref, b.reference.fit, '/reference/fit')
    refFit = rf.result
    const rc = b.reference.component ?? 'tau1'
    const r = lifetimeOf(rf.result, rc, '/reference')
    value = 1 / tau - 1 / r.tau
    if (!(value > 0))
      throw httpError(
        422,
        `τ = ${(tau / TIME_UNITS[trace.timeUnit]).toPrecision(4)} ${trace.timeUnit} is not shorter than τ_ref = `
        + `${(r.tau / TIME_UNITS[ref.timeUnit]).toPrecision(4)} ${ref.timeUnit}: no transfer rate follows`,
        [{ path: '/reference', message: 'τ ≥ τ_ref' }]
      )
    variance += (r.se / (r.tau * r.tau)) ** 2
    Object.assign(provenance, {
      reference: traceRef(ref),
      referenceFit: fitRef(rf.result, rc, rf.irfSha256),
      derivation: 'k_ET = 1/τ − 1/τ_ref'
    })
    Object.assign(rate, { method: 'lifetimes', lifetimeS: tau, referenceLifetimeS: r.tau })
  }
  rate.value = value
  rate.uncertainty = Math.sqrt(variance)
  const data = { ...rec.data, rate, provenance }
  const res = await checkRecords([data], recordValidator(), await ingestContext(), '/record')
  if (res.issueCount) throw httpError(422, 'The record with this rate has problems; it was not changed', res.issues)
  await replaceRecord(versionId, recordId, res.records[0]!)
  return { id: recordId, rate: res.records[0]!.rate, provenance, fit: main.result, referenceFit: refFit, warnings: res.warnings }
}
