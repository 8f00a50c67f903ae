// Forescent local fake S3, for development and tests only. Never expose it beyond localhost.
//
// The s3rver package (a small S3-compatible server keeping objects in a folder) behind a plain HTTP server of our
// own, on 127.0.0.1, with one bucket made at start. Credentials: any well-formed signature is accepted.
// Path-style addressing (http://127.0.0.1:<port>/<bucket>/<key>), so the app needs S3_FORCE_PATH_STYLE=true.
// Helper endpoint for tests: POST /_fake/down toggles "storage down" (every S3 request answers 503 ServiceUnavailable
// until toggled back), to show that an upload stops with a clear message and resumes afterwards.
//
// Run: node fake-services/s3/server.mjs  (env FAKE_S3_PORT (4568), FAKE_S3_BUCKET (forescent), FAKE_S3_DIR
// (./data/fake-s3)); then start the app with S3_BUCKET=forescent S3_ENDPOINT=http://127.0.0.1:4568
// S3_FORCE_PATH_STYLE=true S3_ACCESS_KEY_ID=S3RVER S3_SECRET_ACCESS_KEY=S3RVER.

import http from 'node:http'
import { createReadStream, mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import { pathToFileURL } from 'node:url'
import S3rver from 's3rver'

export const FAKE_S3_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' }

/**
 * Starts the fake on `host` (127.0.0.1) and `port` (0: a free one), storing objects under `directory`.
 * @param {{ port?: number, host?: string, bucket?: string, directory: string, quiet?: boolean }} opts
 */
export async function startFakeS3(opts) {
  const host = opts.host ?? '127.0.0.1'
  const bucket = opts.bucket ?? 'forescent'
  const directory = resolve(opts.directory)
  mkdirSync(directory, { recursive: true })
  const s3 = new S3rver({
    directory, silent: true, vhostBuckets: false, allowMismatchedSignatures: true,
    configureBuckets: [{ name: bucket, configs: [] }],
  })
  await s3.configureBuckets()
  // s3rver reads "bytes=0-0" (the first byte only) as "from 0 to the end" (it treats an end of 0 as none); S3 itself
  // answers the one byte (RFC 9110 section 14.1.2). Mend that one case in its file store.
  const store = s3.store
  const getObject = store.getObject.bind(store)
  store.getObject = async (bucket, key, options) => {
    const object = await getObject(bucket, key, options)
    if (object?.content && options?.end === 0 && options.start === 0) {
      object.content.destroy()
      object.content = createReadStream(store.getResourcePath(bucket, key, 'object'), { start: 0, end: 0 })
      object.range = { start: 0, end: 0 }
    }
    return object
  }
  const middleware = s3.getMiddleware()
  const state = { down: false, requests: 0 }
  const log = (...a) => { if (!opts.quiet) console.log('[fake-s3]', ...a) }

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://localhost')
    if (url.pathname === '/_fake/down' && req.method === 'POST') {
      state.down = !state.down
      res.writeHead(200, { 'content-type': 'application/json' })
      return res.end(JSON.stringify({ down: state.down }))
    }
    state.requests++
    if (state.down) {
      req.resume()
      res.writeHead(503, { 'content-type': 'application/xml' })
      return res.end('<?xml version="1.0" encoding="UTF-8"?><Error><Code>ServiceUnavailable</Code><Message>The fake S3 is switched off for a test.</Message></Error>')
    }
    middleware(req, res)
  })
  await new Promise(r => server.listen(opts.port ?? 0, host, r))
  const port = server.address().port
  const endpoint = `http://${host}:${port}`
  log(`listening on ${endpoint}, bucket "${bucket}", objects under ${directory}`)
  return {
    port, endpoint, bucket, directory, state,
    /** The env vars that point the app at this fake. */
    env: {
      S3_BUCKET: bucket, S3_ENDPOINT: endpoint, S3_REGION: 'us-east-1', S3_FORCE_PATH_STYLE: 'true',
      S3_ACCESS_KEY_ID: FAKE_S3_CREDENTIALS.accessKeyId, S3_SECRET_ACCESS_KEY: FAKE_S3_CREDENTIALS.secretAccessKey,
    },
    setDown(down) { state.down = !!down },
    close: () => new Promise(r => { server.closeAllConnections?.(); server.close(() => r()) }),
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const fake = await startFakeS3({
    port: Number(process.env.FAKE_S3_PORT ?? 4568),
    bucket: process.env.FAKE_S3_BUCKET ?? 'forescent',
    directory: process.env.FAKE_S3_DIR ?? './data/fake-s3',
  })
  console.log('[fake-s3] app env:', Object.entries(fake.env).map(([k, v]) => `${k}=${v}`).join(' '))
}
