/**
 * The mapping step on a 100 000-row sheet as a lab writes it (own headers with units, semicolons, decimal commas, a
 * title block, the solvent written once above the table): reading it, proposing the mapping and checking every row
 * with it, in process. Target: ≤ 5 s.
 */
import Ajv2020 from 'ajv/dist/2020.js'
import rateRecord from '../schemas/rate-record.v1.json'
import { checkFile, readGrid } from '../server/utils/deposit/check'
import { proposeMapping } from '../shared/records/mapping'
import { SOLVENTS } from '../scripts/lib/scenario'
import { report } from './report'

const lines = ['Export of the flash photolysis table (invented)', 'Solvent: toluene', '', 'Donor;Acceptor;Bridge;T / K;k_ET / s^-1;dG / eV;R (Å);Notes']
for (let i = 0; i < 100_000; i++) {
  lines.push(`ZnP-${i % 17};C60-${i % 5};phenylene;${(280 + (i % 40)).toFixed(2).replace('.', ',')};${(0.5 + (i % 1000) / 100).toFixed(3).replace('.', ',')}e9;`
    + `${(-0.2 - (i % 150) / 100).toFixed(3).replace('.', ',')};${(10 + (i % 90) / 10).toFixed(1).replace('.', ',')};row ${i}`)
}
const buf = new TextEncoder().encode(lines.join('\n'))
lines.length = 0
const validate = new Ajv2020({ allErrors: true, strict: true, strictRequired: false, allowUnionTypes: true }).compile(rateRecord)
const ctx = { solvents: new Map(SOLVENTS.map(s => [s.name, { name: s.name, permittivity: s.permittivity, refractiveIndex: s.refractiveIndex, viscosity: s.viscosity }])) }
const t = performance.now()
const { grid } = await readGrid('lab.csv', 'text/csv', buf)
const mapping = proposeMapping(grid)
mapping.constants = { ...mapping.constants, linkage: { value: 'covalent' }, process: { value: 'charge-separation' }, initial_state: { value: 'singlet' }, technique: { value: 'transient-absorption' } }
const res = await checkFile('lab.csv', 'text/csv', buf, validate as never, ctx, mapping)
const seconds = (performance.now() - t) / 1000
if (res.records.length !== 100_000 || res.issueCount) throw new Error(`bench data did not check clean: ${res.issueCount} issues, first ${JSON.stringify(res.issues[0])}`)
report('upload.mapped100k.seconds', seconds, 's', 5)
report('upload.mapped100k.peak_mb', process.resourceUsage().maxRSS / 1024, 'MB', 0)
