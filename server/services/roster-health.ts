import { eq, inArray } from 'drizzle-orm'
import { dogHealthRecords, dogs } from '../database/schema'
import { healthSummary, todayInTimeZone, worstDueState, type DueState } from '../../shared/utils/dogs'

export interface RosterNextDue { state: DueState, name: string, dueOn: string, dogName: string }

/** For the roster's "Next due" column: each client's earliest overdue or due-soon health renewal, one query a page. */
export async function rosterNextDue(clientIds: string[], timeZone = 'Europe/London'): Promise<Map<string, RosterNextDue>> {
  const rows = await useDb().select({
    id: dogHealthRecords.id, dogId: dogHealthRecords.dogId, kind: dogHealthRecords.kind, name: dogHealthRecords.name,
    doneOn: dogHealthRecords.doneOn, dueOn: dogHealthRecords.dueOn, clientId: dogs.clientId, dogName: dogs.name,
  }).from(dogHealthRecords).innerJoin(dogs, eq(dogs.id, dogHealthRecords.dogId)).where(inArray(dogs.clientId, clientIds))
  const byDog = healthSummary(rows, todayInTimeZone(timeZone))
  const dogOf = new Map(rows.map(r => [r.dogId, r]))
  const out = new Map<string, RosterNextDue>()
  for (const [dogId, sum] of Object.entries(byDog)) {
    if (!sum.next) continue
    const dog = dogOf.get(dogId)!
    const cur = out.get(dog.clientId)
    if (!cur || sum.next.dueOn < cur.dueOn) {
      out.set(dog.clientId, { state: cur ? worstDueState([cur.state, sum.state]) : sum.state, name: sum.next.name, dueOn: sum.next.dueOn, dogName: dog.dogName })
    }
  }
  return out
}
