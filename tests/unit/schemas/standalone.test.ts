import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { generateValidatorSource, VALIDATOR_PATH } from '../../../scripts/gen-validators'
// @ts-expect-error generated JavaScript module without types
import standalone from '../../../shared/records/generated/rate-record.validate.mjs'
import Ajv2020 from 'ajv/dist/2020.js'
import rateRecord from '../../../schemas/rate-record.v1.json'
import { DATASETS, demoRecords } from '../../../scripts/lib/scenario'

describe('the browser\'s standalone record validator', () => {
  it('is up to date with schemas/rate-record.v1.json (regenerate with npx tsx scripts/gen-validators.ts)', () => {
    expect(readFileSync(VALIDATOR_PATH, 'utf8')).toBe(generateValidatorSource())
  })
  it('accepts and refuses exactly what the server\'s ajv does', () => {
    const server = new Ajv2020({ allErrors: true, strict: true, strictRequired: false, allowUnionTypes: true }).compile(rateRecord)
    const good = demoRecords(DATASETS[1]!, 0).slice(0, 50)
    const bad = good.slice(0, 20).map((r, i) => {
      const c = JSON.parse(JSON.stringify(r))
      if (i % 4 === 0) c.rate.value = -1
      if (i % 4 === 1) c.process = 'x'
      if (i % 4 === 2) c.system.donor.name = ''
      if (i % 4 === 3) c.system.donor.name = 'x'.repeat(201)
      return c
    })
    for (const r of [...good, ...bad]) {
      expect(standalone(r)).toBe(server(r))
      expect((standalone.errors ?? []).map((e: { instancePath: string }) => e.instancePath)).toEqual((server.errors ?? []).map(e => e.instancePath))
    }
  })
})
