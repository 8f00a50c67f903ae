// Per-client figures that features add to the roster (sample stock, diary, homework, balance…), fetched for one
// page of clients at once (one query per feature, never one per client).
// A feature adds an entry: `key: (clientIds) => Promise<Map<clientId, value>>`.
type Provider = (clientIds: string[]) => Promise<Map<string, unknown>>

const PROVIDERS: Record<string, Provider> = {
  nextDue: clientIds => rosterNextDue(clientIds),
  samples: clientIds => sampleRosterStatus(clientIds),
  diary: clientIds => diaryRosterFigures(clientIds),
  balance: clientIds => invoiceBalances(clientIds),
  training: clientIds => trainingRosterStatus(clientIds),
  homework: clientIds => homeworkRosterCounts(clientIds),
}

export async function rosterExtras(clientIds: string[]): Promise<Map<string, Record<string, unknown>>> {
  const out = new Map<string, Record<string, unknown>>(clientIds.map(id => [id, {}]))
  if (!clientIds.length) return out
  const entries = Object.entries(PROVIDERS)
  const results = await Promise.all(entries.map(([, fn]) => fn(clientIds)))
  entries.forEach(([key], i) => {
    for (const [clientId, value] of results[i]!) out.get(clientId)![key] = value
  })
  return out
}
