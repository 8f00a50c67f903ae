// Secrets the server must read back later (a second factor's TOTP key) are sealed with AES-256-GCM under a key
// derived (HKDF-SHA256) from the server's session secret, so a copy of the database alone does not give them away
// (OWASP ASVS 4.0 V2.9.1 and V6.2.x).
import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from 'node:crypto'

function sealingKey(): Buffer {
  const secret = process.env.NUXT_SESSION_PASSWORD || (useRuntimeConfig().session as { password?: string } | undefined)?.password
  if (!secret) throw new Error('NUXT_SESSION_PASSWORD is not set: it is needed to seal second-factor secrets.')
  return Buffer.from(hkdfSync('sha256', secret, 'forescent', 'second-factor-secret', 32))
}

export function sealSecret(plain: string): string {
  const iv = randomBytes(12)
  const cipher = createCipheriv('aes-256-gcm', sealingKey(), iv)
  const body = Buffer.concat([cipher.update(plain, 'utf8'), cipher.final()])
  return ['v1', iv.toString('base64url'), cipher.getAuthTag().toString('base64url'), body.toString('base64url')].join('.')
}

export function openSecret(sealed: string): string {
  const [version, iv, tag, body] = sealed.split('.')
  if (version !== 'v1' || !iv || !tag || !body) throw new Error('Unknown sealed secret format.')
  const decipher = createDecipheriv('aes-256-gcm', sealingKey(), Buffer.from(iv, 'base64url'))
  decipher.setAuthTag(Buffer.from(tag, 'base64url'))
  return Buffer.concat([decipher.update(Buffer.from(body, 'base64url')), decipher.final()]).toString('utf8')
}
