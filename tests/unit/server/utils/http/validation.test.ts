import { describe, expect, it } from 'vitest'
import { compile, compiledValidatorCount, useAjv } from '../../../../../server/utils/http/validation'

describe('compiled validators', () => {
  it('a schema written inline (a new object per request) is compiled once, not once per request', () => {
    const before = compiledValidatorCount()
    // ajv's own cache of compiled schema objects (a Map inside ajv; reading it is only for this check)
    const ajvCache = (useAjv() as unknown as { _cache: Map<object, unknown> })._cache
    const cached = ajvCache.size
    const fns = new Set<unknown>()
    for (let i = 0; i < 1000; i++) {
      const v = compile({ type: 'object', additionalProperties: false, properties: { version: { type: 'integer', minimum: 1 } } })
      fns.add(v)
      expect(v({ version: 2 })).toBe(true)
      expect(v({ version: 0 })).toBe(false)
    }
    expect(fns.size).toBe(1)
    expect(compiledValidatorCount()).toBe(before + 1)
    expect(ajvCache.size).toBe(cached + 1)
  })
  it('different schemas still get their own validators', () => {
    const a = compile({ type: 'object', properties: { q: { type: 'string', maxLength: 3 } } })
    const b = compile({ type: 'object', properties: { q: { type: 'string', maxLength: 5 } } })
    expect(a).not.toBe(b)
    expect(a({ q: 'abcd' })).toBe(false)
    expect(b({ q: 'abcd' })).toBe(true)
  })
})
