import { describe, expect, it } from 'vitest'
import { rateLimitSizes, recordFailure, slowAfterFailures } from '../../../../../server/utils/http/rate-limit'

describe('sign-in failure memory', () => {
  it('stays bounded when every attempt names a new account, and still slows the account being tried now', async () => {
    const { max } = rateLimitSizes()
    for (let i = 0; i < max + 20_000; i++) recordFailure(`someone${i}@example.org`, false)
    expect(rateLimitSizes().failures).toBe(max)
    for (let i = 0; i < 4; i++) recordFailure('target@example.org', false)
    const t = performance.now()
    await slowAfterFailures('target@example.org')
    // four failures: 250 ms × 2^(4−2) = 1 s (the rule in rate-limit.ts)
    expect(performance.now() - t).toBeGreaterThanOrEqual(950)
    recordFailure('target@example.org', true)
    const u = performance.now()
    await slowAfterFailures('target@example.org')
    expect(performance.now() - u).toBeLessThan(200)
  })
})
