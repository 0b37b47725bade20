/**
 * From a flat row (a CSV/XLSX line or the entry form) to a canonical rate record: unit conversion,
 * derived values (rate from lifetimes, ΔG° from potentials) with the formula used, then the checks
 * every path shares (schema + the semantic rules in checkRecord). Pure: the caller passes the
 * compiled schema validator and the solvent table.
 *
 * Layout: ingest-types.ts (shapes) → row-to-record.ts (a row to a record) → this file (checks, one entry point).
 */
import type { ErrorObject } from 'ajv'
import type { PhysicsInputError } from '../physics'
import { convertEnergy, diffusionLimit, drivingForceByProcess, WAVENUMBER_PER_EV } from '../physics'
import { columnForPointer } from './columns'
import type { RateRecordV1 } from './types'
import type { Cell, IngestContext, RowIssue, RowResult, SchemaValidator } from './ingest-types'
import { rowToRecord } from './row-to-record'

export * from './ingest-types'
export { rowToRecord }

export function checkRecord (r: RateRecordV1, ctx: IngestContext): { issues: RowIssue[], warnings: RowIssue[] } {
  const issues: RowIssue[] = []
  const warnings: RowIssue[] = []
  const at = (list: RowIssue[], path: string, message: string) =>
    list.push({ path, column: columnForPointer(path), message })
  if (r.rate.method === 'lifetimes') {
    const t = r.rate.lifetimeS
    const tr = r.rate.referenceLifetimeS
    if (t === undefined || tr === undefined)
      at(issues, '/rate/method', 'a rate from lifetimes needs lifetimeS and referenceLifetimeS')
    else if (t >= tr)
      at(
        issues,
        '/rate/lifetimeS',
        'The lifetime with the acceptor must be shorter than the reference lifetime; no electron-transfer rate can be derived'
      )
    // 0.1 % leaves room for lifetimes and rates reported to four significant figures (common practice)
    else if (Math.abs(r.rate.value - (1 / t - 1 / tr)) > 1e-3 * r.rate.value)
      at(issues, '/rate/value', `does not equal 1/τ − 1/τ_ref = ${(1 / t - 1 / tr).toExponential(4)} s⁻¹`)
  }
  const df = r.drivingForce
  if (df?.method === 'redox-potentials') {
    if (!df.redox) at(issues, '/drivingForce/redox', 'is required when the method is redox-potentials')
    else {
      const eps = r.medium.permittivity
      if (eps === undefined) at(issues, '/medium/permittivity', 'is needed to check ΔG° against the potentials')
      else {
        try {
          const rw = drivingForceByProcess(r.process, {
            ...df.redox,
            distance: r.geometry?.centerToCenterAngstrom,
            solventPermittivity: eps
          })
          if (Math.abs(rw.deltaG - df.value) > 0.005)
            at(
              issues,
              '/drivingForce/value',
              `does not match the potentials: ${rw.name} gives ${rw.deltaG.toFixed(3)} eV`
            )
        }
        catch (e) {
          for (const i of (e as PhysicsInputError).issues ?? [])
            at(issues, i.path === '/process' ? '/process' : '/drivingForce/redox' + i.path, i.message)
        }
      }
    }
  }
  if (df?.redox && df.redox.donorReference !== df.redox.acceptorReference && df.redox.referenceOffset !== undefined) {
    at(
      warnings,
      '/drivingForce/redox/referenceOffset',
      `mixed reference electrodes (${df.redox.donorReference}, ${df.redox.acceptorReference}); the recorded offset of `
      + `${df.redox.referenceOffset} V was applied`
    )
  }
  // usual ranges: common practice, no single source
  if (r.rate.kind === 'unimolecular' && (r.rate.value < 1e3 || r.rate.value > 1e14))
    at(warnings, '/rate/value', `${r.rate.value.toExponential(2)} s⁻¹ is outside the usual 1e3–1e14 s⁻¹`)
  if (r.rate.kind === 'unimolecular' && r.rate.value > 6e12 * (r.temperatureK / 298.15))
    at(warnings, '/rate/value', 'is above k_BT/h, the activationless ceiling of a non-adiabatic rate')
  if (r.rate.kind === 'bimolecular') {
    const s = r.medium.solvent ? ctx.solvents.get(r.medium.solvent.toLowerCase()) : undefined
    if (s?.viscosity) {
      const kd = diffusionLimit(s.viscosity * 1e-3, r.temperatureK)
      if (r.rate.value >= 0.5 * kd)
        at(
          warnings,
          '/rate/value',
          `is near the diffusion limit (k_diff ≈ ${kd.toExponential(2)} M⁻¹ s⁻¹ in ${s.name}); it says little about `
          + `the electron-transfer step`
        )
    }
    if (r.system.linkage !== 'bimolecular')
      at(warnings, '/system/linkage', 'a bimolecular rate usually goes with linkage "bimolecular"')
  }
  if (df && Math.abs(df.value) > 3.5)
    at(warnings, '/drivingForce/value', `|ΔG°| = ${Math.abs(df.value).toFixed(2)} eV is beyond the usual 3.5 eV`)
  const p = r.reportedParameters
  if (p?.lambdaSolvent !== undefined && (p.lambdaSolvent < 0.1 || p.lambdaSolvent > 2))
    at(warnings, '/reportedParameters/lambdaSolvent', 'λ_s outside the usual 0.1–2 eV')
  if (p?.lambdaInternal !== undefined && (p.lambdaInternal < 0.05 || p.lambdaInternal > 0.8))
    at(warnings, '/reportedParameters/lambdaInternal', 'λ_i outside the usual 0.05–0.8 eV')
  if (p?.vibrationEnergy !== undefined && (p.vibrationEnergy < 0.06 || p.vibrationEnergy > 0.25))
    at(warnings, '/reportedParameters/vibrationEnergy', 'ħω outside the usual 0.06–0.25 eV')
  if (p?.coupling !== undefined) {
    const cm = p.coupling * WAVENUMBER_PER_EV
    if (cm < 0.1 || cm > 1000)
      at(warnings, '/reportedParameters/coupling', `V = ${cm.toPrecision(3)} cm⁻¹ is outside the usual 0.1–1000 cm⁻¹`)
  }
  if (r.temperatureK < 4 || r.temperatureK > 500)
    at(warnings, '/temperatureK', `${r.temperatureK} K is unusual for a rate measurement`)
  return { issues, warnings }
}

/** Schema errors as row issues with the column they belong to. */
export function schemaIssues (errors: ErrorObject[] | null | undefined): RowIssue[] {
  return (errors ?? [])
    .filter(e => (e.keyword !== 'if' && e.keyword !== 'anyOf') || e.instancePath === '/medium')
    .map((e) => {
      let path = e.instancePath
      let message = e.message ?? 'is not valid'
      if (e.keyword === 'required') {
        path += `/${(e.params as { missingProperty: string }).missingProperty}`
        message = 'is required'
      }
      if (e.keyword === 'additionalProperties') {
        path += `/${(e.params as { additionalProperty: string }).additionalProperty}`
        message = 'is not a field of the record format'
      }
      if (e.keyword === 'enum')
        message = `must be one of: ${(e.params as { allowedValues: unknown[] }).allowedValues.join(', ')}`
      if (e.keyword === 'anyOf' && e.instancePath === '/medium') message = 'needs a solvent or a matrix'
      return { path: path || '/', column: columnForPointer(path), message }
    })
}

/** The full check of one canonical record: schema, then the shared rules. */
export function validateRecord (
  record: unknown,
  validate: SchemaValidator,
  ctx: IngestContext
): { issues: RowIssue[], warnings: RowIssue[] } {
  if (!validate(record)) return { issues: dedupe(schemaIssues(validate.errors)), warnings: [] }
  return checkRecord(record as RateRecordV1, ctx)
}

/** Row → record → full check, as the upload and the form do it. */
export function ingestRow (
  cells: Record<string, Cell>,
  units: Record<string, string | undefined>,
  validate: SchemaValidator,
  ctx: IngestContext
): RowResult {
  const built = rowToRecord(cells, units, ctx)
  if (built.issues.length) return { ...built, record: undefined }
  const v = validateRecord(built.record, validate, ctx)
  return { ...built, issues: v.issues, warnings: v.warnings, record: v.issues.length ? undefined : built.record }
}

function dedupe (xs: RowIssue[]): RowIssue[] {
  const seen = new Set<string>()
  return xs.filter((x) => {
    const k = `${x.path}|${x.message}`
    if (seen.has(k)) return false
    seen.add(k)
    return true
  })
}

export { convertEnergy }
