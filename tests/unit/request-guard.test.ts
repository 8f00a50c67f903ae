import { describe, expect, it } from 'vitest'
import { BODY_LIMITS, bodyClassOf, isJsonContentType, judgeOrigin } from '../../shared/utils/request-guard'
import { numeric, toNumberIfNumeric, yearInRange } from '../../shared/schemas/common'
import { z } from 'zod'

const own = 'http://127.0.0.1:3000'

describe('judgeOrigin (OWASP CSRF Prevention Cheat Sheet: standard headers and Fetch Metadata)', () => {
  it('takes our own origin, and Sec-Fetch-Site: same-origin when there is no Origin', () => {
    expect(judgeOrigin({ origin: own, ownOrigin: own })).toBe('same-origin')
    expect(judgeOrigin({ origin: own, secFetchSite: 'same-origin', ownOrigin: own })).toBe('same-origin')
    expect(judgeOrigin({ secFetchSite: 'same-origin', ownOrigin: own })).toBe('same-origin')
  })
  it('refuses a request that shows neither', () => {
    expect(judgeOrigin({ ownOrigin: own })).toBe('missing')
    expect(judgeOrigin({ origin: '', ownOrigin: own })).toBe('missing')
  })
  it('compares scheme, host and port', () => {
    expect(judgeOrigin({ origin: 'https://127.0.0.1:3000', ownOrigin: own })).toBe('cross-site')
    expect(judgeOrigin({ origin: 'http://127.0.0.1:3001', ownOrigin: own })).toBe('cross-site')
    expect(judgeOrigin({ origin: 'http://localhost:3000', ownOrigin: own })).toBe('cross-site')
    expect(judgeOrigin({ origin: 'http://evil.example', ownOrigin: own })).toBe('cross-site')
  })
  it('refuses null, unparsable origins, origins with a path, and other Sec-Fetch-Site values even with a good Origin', () => {
    for (const origin of ['null', 'not a url', `${own}/path`, 'javascript:alert(1)']) expect(judgeOrigin({ origin, ownOrigin: own }), origin).toBe('cross-site')
    for (const site of ['cross-site', 'same-site', 'none']) expect(judgeOrigin({ origin: own, secFetchSite: site, ownOrigin: own }), site).toBe('cross-site')
  })
})

describe('body classes', () => {
  it('sorts routes into classes with their limits', () => {
    expect(bodyClassOf('/api/auth/login')).toBe('auth')
    expect(bodyClassOf('/api/invitations/abc/accept')).toBe('auth')
    expect(bodyClassOf('/api/webhooks/stripe')).toBe('webhook')
    expect(bodyClassOf('/api/clients/x/documents')).toBe('upload')
    expect(bodyClassOf('/api/dogs/x/photo')).toBe('upload')
    expect(bodyClassOf('/api/homework-uploads/abc?x=1')).toBe('upload')
    expect(bodyClassOf('/api/clients/x/training-sessions')).toBe('json')
    expect(BODY_LIMITS.auth).toBeLessThan(BODY_LIMITS.json)
  })
  it('knows a JSON media type (RFC 8259 section 11) from the rest', () => {
    expect(isJsonContentType('application/json')).toBe(true)
    expect(isJsonContentType('application/json; charset=utf-8')).toBe(true)
    for (const t of ['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x', 'application/jsonp', '', undefined]) expect(isJsonContentType(t), String(t)).toBe(false)
  })
})

describe('strict numbers and plausible years', () => {
  const n = numeric(z.number({ invalid_type_error: 'Enter a number.' }).int().min(1))
  it('takes numbers and numeric text; never booleans, null, blanks or arrays', () => {
    expect(n.parse(5)).toBe(5)
    expect(n.parse(' 7 ')).toBe(7)
    for (const bad of [true, false, null, '', '  ', [3], '3abc', {}]) expect(n.safeParse(bad).success, JSON.stringify(bad)).toBe(false)
    expect(toNumberIfNumeric(true)).toBe(true)
  })
  it('years 1900 to 2200 only', () => {
    expect(yearInRange('1900-01-01')).toBe(true)
    expect(yearInRange('2200-12-31T23:59:00Z')).toBe(true)
    for (const bad of ['0000-01-01', '1899-12-31', '2201-01-01', '9999-01-01']) expect(yearInRange(bad), bad).toBe(false)
  })
})
