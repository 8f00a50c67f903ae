import { describe, expect, it } from 'vitest'
import { matchTotp, normaliseRecoveryCode, recoveryCodesFrom, totpCode, totpSecretFromBytes, totpStep, totpUri } from '../../shared/utils/second-factor'

const ascii = (s: string) => new TextEncoder().encode(s)
// RFC 6238 appendix B: the test keys are the ASCII digits "1234567890" repeated to 20, 32 and 64 bytes.
const SHA1_KEY = totpSecretFromBytes(ascii('12345678901234567890'))
const SHA256_KEY = totpSecretFromBytes(ascii('12345678901234567890123456789012'))
const SHA512_KEY = totpSecretFromBytes(ascii('1234567890123456789012345678901234567890123456789012345678901234'))

// RFC 6238 appendix B, the table of test vectors (time in seconds, 8-digit TOTP for SHA-1, SHA-256, SHA-512).
const VECTORS: Array<[number, string, string, string]> = [
  [59, '94287082', '46119246', '90693936'],
  [1111111109, '07081804', '68084774', '25091201'],
  [1111111111, '14050471', '67062674', '99943326'],
  [1234567890, '89005924', '91819424', '93441116'],
  [2000000000, '69279037', '90698825', '38618901'],
  [20000000000, '65353130', '77737706', '47863826'],
]

describe('TOTP against RFC 6238 appendix B', () => {
  for (const [seconds, sha1, sha256, sha512] of VECTORS) {
    it(`T = ${seconds} s`, () => {
      expect(totpCode(SHA1_KEY, seconds * 1000, { digits: 8, algorithm: 'SHA1' })).toBe(sha1)
      expect(totpCode(SHA256_KEY, seconds * 1000, { digits: 8, algorithm: 'SHA256' })).toBe(sha256)
      expect(totpCode(SHA512_KEY, seconds * 1000, { digits: 8, algorithm: 'SHA512' })).toBe(sha512)
      // And our verifier accepts the same codes at that moment.
      expect(matchTotp(SHA1_KEY, sha1, seconds * 1000, null, { digits: 8 })).toBe(totpStep(seconds * 1000))
    })
  }
  it('our 6-digit codes are the last six digits of the RFC\'s 8-digit ones (same truncation, RFC 4226 section 5.3)', () => {
    expect(totpCode(SHA1_KEY, 59_000)).toBe('287082')
    expect(totpCode(SHA1_KEY, 1111111109_000)).toBe('081804')
  })
})

describe('matchTotp', () => {
  const at = 1_800_000_000_000
  it('accepts the code of this step and of one step either side, not two', () => {
    for (const d of [-1, 0, 1]) expect(matchTotp(SHA1_KEY, totpCode(SHA1_KEY, at + d * 30_000), at, null), String(d)).not.toBeNull()
    for (const d of [-2, 2]) expect(matchTotp(SHA1_KEY, totpCode(SHA1_KEY, at + d * 30_000), at, null), String(d)).toBeNull()
  })
  it('refuses a code already used (its step or an earlier one) and malformed input', () => {
    const code = totpCode(SHA1_KEY, at)
    const step = matchTotp(SHA1_KEY, code, at, null)!
    expect(matchTotp(SHA1_KEY, code, at, step)).toBeNull()
    expect(matchTotp(SHA1_KEY, totpCode(SHA1_KEY, at + 30_000), at + 30_000, step)).toBe(step + 1)
    for (const bad of ['', '12345', '1234567', 'abcdef', '12 34 5x']) expect(matchTotp(SHA1_KEY, bad, at, null), bad).toBeNull()
    expect(matchTotp(SHA1_KEY, `${code.slice(0, 3)} ${code.slice(3)}`, at, null)).toBe(step)
  })
  it('gives an otpauth address apps read (Key Uri Format)', () => {
    expect(totpUri(SHA1_KEY, 'maren@example.test')).toMatch(/^otpauth:\/\/totp\/Forescent:maren%40example\.test\?issuer=Forescent&secret=[A-Z2-7]+&algorithm=SHA1&digits=6&period=30$/)
  })
})

describe('recovery codes', () => {
  it('ten distinct codes of 10 characters in two groups, without look-alike characters', () => {
    const random = new Uint8Array(100).map((_, i) => (i * 37 + 11) % 256)
    const codes = recoveryCodesFrom(random)
    expect(codes).toHaveLength(10)
    expect(new Set(codes).size).toBe(10)
    for (const c of codes) expect(c).toMatch(/^[a-hjkmnp-z2-9]{5}-[a-hjkmnp-z2-9]{5}$/)
    expect(normaliseRecoveryCode(' ABCDE-fghjk ')).toBe('abcdefghjk')
  })
})
