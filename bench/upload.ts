/** Upload check of a 100 000-row CSV, in-process: seconds and the process's peak resident memory. */
import Ajv2020 from 'ajv/dist/2020.js'
import rateRecord from '../schemas/rate-record.v1.json'
import { checkFile } from '../server/utils/deposit/check'
import { SOLVENTS } from '../scripts/lib/scenario'
import { report } from './report'

export async function uploadBench (): Promise<void> {
  const header = 'donor_name,acceptor_name,bridge_name,linkage,process,initial_state,solvent,temperature (K),distance_cc (angstrom),rate (ns-1),rate_uncertainty (ns-1),delta_g (kJ/mol),technique,notes'
  const lines = [header]
  for (let i = 0; i < 100_000; i++) {
    lines.push(`ZnP-${i % 17},C60-${i % 5},phenylene,covalent,charge-separation,singlet,"${SOLVENTS[i % SOLVENTS.length]!.name}",${(280 + (i % 40)).toFixed(2)},${(10 + (i % 90) / 10).toFixed(1)},${(0.5 + (i % 1000) / 100).toFixed(3)},0.1,${(-20 - (i % 150)).toFixed(1)},transient-absorption,"row ${i}, invented"`)
  }
  const buf = new TextEncoder().encode(lines.join('\r\n'))
  lines.length = 0
  const validate = new Ajv2020({ allErrors: true, strict: true, strictRequired: false, allowUnionTypes: true }).compile(rateRecord)
  const ctx = { solvents: new Map(SOLVENTS.map(s => [s.name, { name: s.name, permittivity: s.permittivity, refractiveIndex: s.refractiveIndex, viscosity: s.viscosity }])) }
  const t = performance.now()
  const res = await checkFile('bench.csv', 'text/csv', buf, validate as never, ctx)
  const seconds = (performance.now() - t) / 1000
  if (res.records.length !== 100_000 || res.issueCount) throw new Error(`bench data did not check clean: ${res.issueCount} issues, first ${JSON.stringify(res.issues[0])}`)
  report('upload.check100k.seconds', seconds, 's', 5)
  report('upload.check100k.peak_mb', process.resourceUsage().maxRSS / 1024, 'MB', 500)
}

if (process.argv[1]?.endsWith('upload.ts')) await uploadBench()
