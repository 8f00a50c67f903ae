/**
 * TRUST_PROXY=1 says the app runs behind our own reverse proxy, which sets X-Forwarded-For, -Host and -Proto and
 * X-Request-Id: only then are those headers believed (otherwise anyone could forge them).
 */
export function trustProxy(): boolean {
  return /^(1|true|yes)$/i.test(process.env.TRUST_PROXY ?? '')
}
