import { and, eq, lt } from 'drizzle-orm'
import { setBeforeCommit } from '../database/client'
import { requestKeys } from '../database/schema'
import { REQUEST_KEY_KEEP_DAYS } from '../../shared/utils/request-keys'

// Completes what server/middleware/2.request-key.ts starts: a transaction committing during a keyed request marks
// its key applied in the same transaction; a successful answer is stored for repeats; a refused or failed one frees
// the key so the corrected record can be sent again with it.
export default defineNitroPlugin((nitroApp) => {
  setBeforeCommit(() => {
    let key: string | undefined
    try { key = useEvent().context.requestKey }
    catch { return null } // outside a request (start-up, scheduled jobs)
    return key ? { sql: `update request_keys set state = 'applied' where key = ? and state = 'pending'`, args: [key] } : null
  })

  nitroApp.hooks.hook('beforeResponse', async (event, response) => {
    const key = event.context.requestKey
    if (!key) return
    event.context.requestKey = undefined
    const status = event.node.res.statusCode
    if (status >= 400) return release(key)
    const body = response.body
    const text = typeof body === 'string' ? body : JSON.stringify(body ?? null)
    await useDb().update(requestKeys).set({ state: 'done', statusCode: status, response: text, completedAt: new Date() }).where(eq(requestKeys.key, key))
  })
  nitroApp.hooks.hook('error', async (_error, { event }) => {
    const key = event?.context.requestKey
    if (!event || !key) return
    event.context.requestKey = undefined
    await release(key)
  })

  // Old keys are forgotten once no phone can still be holding their record.
  const sweep = () => useDb().delete(requestKeys).where(lt(requestKeys.receivedAt, new Date(Date.now() - REQUEST_KEY_KEEP_DAYS * 86_400_000))).catch(() => {})
  setTimeout(sweep, 60_000).unref()
  setInterval(sweep, 86_400_000).unref()
})

/** A refused or failed first send: forget the key unless its record was already committed. */
async function release(key: string) {
  await useDb().delete(requestKeys).where(and(eq(requestKeys.key, key), eq(requestKeys.state, 'pending')))
}
