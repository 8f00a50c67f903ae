// The demo scenario: an invented training business, its people and dogs. Every name here is invented.
import { createHash } from 'node:crypto'
import { resolve } from 'node:path'
import { sql } from 'drizzle-orm'
import type { Database } from '../../server/database/client'
import * as s from '../../server/database/schema'
import { hashPassword } from './password'
import { DOG_TABLES_CHILD_FIRST, bulkDogHistory, seedDogProfile } from './seed-dogs'
import { DIARY_TABLES_CHILD_FIRST, seedDiaries } from './seed-diary'
import { SAMPLE_TABLES_CHILD_FIRST, seedSampleBanks } from './seed-samples'
import { TRAINING_TABLES_CHILD_FIRST, seedBulkTraining, seedTraining } from './seed-training'
import { INVOICE_TABLES_CHILD_FIRST, seedInvoices } from './seed-invoices'
import { HOMEWORK_TABLES_CHILD_FIRST, seedHomework } from './seed-homework'
import { SCHEDULE_TABLES_CHILD_FIRST, seedSchedule } from './seed-schedule'

export const DEMO_PASSWORD = process.env.DEMO_PASSWORD || 'forescent-demo'
export const BUSINESS_NAME = 'Larkspur Scent Partners'

/** A stable id from a name, so the seed gives the same rows every run. */
export function seedId(name: string): string {
  const h = createHash('sha256').update(`forescent-seed:${name}`).digest('hex')
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-4${h.slice(13, 16)}-a${h.slice(17, 20)}-${h.slice(20, 32)}`
}

/** Dates relative to the seed's day (SEED_TODAY=YYYY-MM-DD fixes it, for byte-identical runs). */
export function seedToday(): Date {
  const fixed = process.env.SEED_TODAY
  const d = fixed ? new Date(`${fixed}T00:00:00Z`) : new Date()
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()))
}
const daysAgo = (today: Date, n: number) => new Date(today.getTime() - n * 86_400_000)
const isoDay = (d: Date) => d.toISOString().slice(0, 10)

interface PersonSeed { key: string, email: string, name: string, role: 'admin' | 'trainer' | 'handler' }
export const PEOPLE: PersonSeed[] = [
  { key: 'admin', email: 'admin@forescent.test', name: 'Elspeth Varga', role: 'admin' },
  { key: 'trainer', email: 'trainer@forescent.test', name: 'Maren Holt', role: 'trainer' },
  { key: 'trainer2', email: 'trainer2@forescent.test', name: 'Tobias Quennell', role: 'trainer' },
  { key: 'trainer3', email: 'ines.okoro@larkspur.test', name: 'Ines Okoro', role: 'trainer' },
  { key: 'handler', email: 'handler@forescent.test', name: 'Ada Fairweather', role: 'handler' },
  { key: 'handler2', email: 'handler2@forescent.test', name: 'Ruth Achterberg', role: 'handler' },
  { key: 'h-lind', email: 'karin.lindgren@example.test', name: 'Karin Lindgren', role: 'handler' },
  { key: 'h-moreau', email: 'theo.moreau@example.test', name: 'Théo Moreau', role: 'handler' },
  { key: 'h-cast', email: 'dani.castellano@example.test', name: 'Dani Castellano', role: 'handler' },
  { key: 'h-ferris', email: 'joel.ferris@example.test', name: 'Joel Ferris', role: 'handler' },
  { key: 'h-naka', email: 'mei.nakashima@example.test', name: 'Mei Nakashima', role: 'handler' },
  { key: 'h-bren', email: 'orla.brennan@example.test', name: 'Orla Brennan', role: 'handler' },
]

interface ClientSeed {
  key: string, trainer: string, household: string, person: string, condition: 'migraine' | 'hypoglycaemia' | 'seizure' | 'other'
  conditionDetail?: string, status: 'intake' | 'active' | 'placed' | 'aftercare' | 'closed', startedDaysAgo: number | null
  earlySigns: string, frequency: string, onset: string, town: string
  handlers: { key: string, relationship: 'self' | 'parent' | 'partner' | 'carer' | 'other' }[]
  dog: { name: string, breed: string, sex: 'female' | 'male', ageDays: number, source: 'own-dog' | 'programme-bred' | 'rescue', status: 'assessment' | 'in-training' | 'placed' | 'retired' | 'withdrawn' }
}

export const CLIENTS: ClientSeed[] = [
  { key: 'fairweather', trainer: 'trainer', household: 'Fairweather household', person: 'Ada Fairweather', condition: 'migraine', status: 'active', startedDaysAgo: 142, earlySigns: 'Yawning, a stiff neck and light sensitivity about an hour before the headache.', frequency: 'About 6 a month', onset: 'Often early morning', town: 'Ashcombe', handlers: [{ key: 'handler', relationship: 'self' }], dog: { name: 'Juniper', breed: 'Labrador Retriever', sex: 'female', ageDays: 800, source: 'own-dog', status: 'in-training' } },
  { key: 'lindgren', trainer: 'trainer', household: 'Lindgren household', person: 'Sami Lindgren', condition: 'hypoglycaemia', conditionDetail: 'Type 1 diabetes, age 11', status: 'active', startedDaysAgo: 61, earlySigns: 'Goes pale and quiet, shaky hands.', frequency: 'Several a week, mostly at night', onset: 'Night and after sport', town: 'Fenwick Cross', handlers: [{ key: 'h-lind', relationship: 'parent' }], dog: { name: 'Pepper', breed: 'Standard Poodle', sex: 'female', ageDays: 510, source: 'programme-bred', status: 'in-training' } },
  { key: 'moreau', trainer: 'trainer', household: 'Moreau household', person: 'Théo Moreau', condition: 'seizure', status: 'active', startedDaysAgo: 260, earlySigns: 'A rising feeling in the stomach, then confusion.', frequency: 'About 2 a month', onset: 'Any time, more often when tired', town: 'Ashcombe', handlers: [{ key: 'h-moreau', relationship: 'self' }], dog: { name: 'Basil', breed: 'Border Collie cross', sex: 'male', ageDays: 1300, source: 'rescue', status: 'in-training' } },
  { key: 'nakashima', trainer: 'trainer', household: 'Nakashima household', person: 'Mei Nakashima', condition: 'migraine', status: 'aftercare', startedDaysAgo: 480, earlySigns: 'Visual aura, tingling in one hand.', frequency: 'About 3 a month', onset: 'Afternoons', town: 'Holloway Green', handlers: [{ key: 'h-naka', relationship: 'self' }], dog: { name: 'Sable', breed: 'Cocker Spaniel', sex: 'female', ageDays: 1650, source: 'own-dog', status: 'placed' } },
  { key: 'achterberg', trainer: 'trainer2', household: 'Achterberg household', person: 'Ruth Achterberg', condition: 'migraine', status: 'active', startedDaysAgo: 35, earlySigns: 'Food cravings and irritability the evening before.', frequency: 'About 4 a month', onset: 'Mornings', town: 'Millbrook', handlers: [{ key: 'handler2', relationship: 'self' }], dog: { name: 'Thistle', breed: 'Golden Retriever', sex: 'female', ageDays: 620, source: 'own-dog', status: 'in-training' } },
  { key: 'castellano', trainer: 'trainer2', household: 'Castellano household', person: 'Dani Castellano', condition: 'hypoglycaemia', conditionDetail: 'Type 1 diabetes', status: 'active', startedDaysAgo: 190, earlySigns: 'Sweating, hunger, blurred vision.', frequency: 'Weekly', onset: 'Late afternoon', town: 'Millbrook', handlers: [{ key: 'h-cast', relationship: 'self' }], dog: { name: 'Marlow', breed: 'Labradoodle', sex: 'male', ageDays: 980, source: 'programme-bred', status: 'in-training' } },
  { key: 'brennan', trainer: 'trainer2', household: 'Brennan household', person: 'Orla Brennan', condition: 'other', conditionDetail: 'Fainting episodes (vasovagal syncope)', status: 'intake', startedDaysAgo: null, earlySigns: 'Light-headed, ringing ears.', frequency: 'A few a month', onset: 'When standing for long', town: 'Kestle Bay', handlers: [{ key: 'h-bren', relationship: 'self' }], dog: { name: 'Fennel', breed: 'Whippet', sex: 'male', ageDays: 420, source: 'own-dog', status: 'assessment' } },
  { key: 'ferris', trainer: 'trainer3', household: 'Ferris household', person: 'Elliot Ferris', condition: 'seizure', conditionDetail: 'Epilepsy, age 9', status: 'active', startedDaysAgo: 98, earlySigns: 'Staring spells before larger seizures.', frequency: 'About 5 a month', onset: 'Early morning', town: 'Kestle Bay', handlers: [{ key: 'h-ferris', relationship: 'parent' }], dog: { name: 'Wren', breed: 'Australian Shepherd', sex: 'female', ageDays: 700, source: 'programme-bred', status: 'in-training' } },
]

const TABLES_CHILD_FIRST = ['outbox', 'audit_log', 'homework_notes', 'bag_code_prefixes', ...SCHEDULE_TABLES_CHILD_FIRST, 'recovery_codes', 'password_resets', 'invitations', 'business_settings', 'documents', 'dog_photos', ...HOMEWORK_TABLES_CHILD_FIRST, ...INVOICE_TABLES_CHILD_FIRST, ...TRAINING_TABLES_CHILD_FIRST, ...SAMPLE_TABLES_CHILD_FIRST, ...DIARY_TABLES_CHILD_FIRST, ...DOG_TABLES_CHILD_FIRST, 'dogs', 'client_handlers', 'clients', 'users'] as const

/**
 * Empties every table and writes the demo scenario, in one transaction. `filesDir` is the local file storage the
 * seeded homework videos are copied into (default FILES_DIR, or ./data/files; none when an S3 bucket is set).
 */
export async function seedDemo(db: Database, opts: { extraClients?: number, filesDir?: string | null } = {}) {
  const filesDir = opts.filesDir !== undefined ? opts.filesDir : process.env.S3_BUCKET ? null : resolve(process.cwd(), process.env.FILES_DIR || './data/files')
  const today = seedToday()
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  await db.transaction(async (tx) => {
    for (const t of TABLES_CHILD_FIRST) await tx.run(sql.raw(`DELETE FROM ${t}`))
    await tx.insert(s.users).values(PEOPLE.map(p => ({
      id: seedId(`user:${p.key}`), email: p.email, name: p.name, role: p.role, passwordHash,
      createdAt: daysAgo(today, 500), updatedAt: daysAgo(today, 500),
    })))
    for (const c of CLIENTS) {
      const clientId = seedId(`client:${c.key}`)
      await tx.insert(s.clients).values({
        id: clientId, trainerId: seedId(`user:${c.trainer}`), householdName: c.household, personName: c.person,
        condition: c.condition, conditionDetail: c.conditionDetail ?? null, status: c.status,
        programmeStartedOn: c.startedDaysAgo === null ? null : isoDay(daysAgo(today, c.startedDaysAgo)),
        earlySigns: c.earlySigns, episodeFrequency: c.frequency, usualOnset: c.onset, town: c.town,
        clinicianName: 'Dr. F. Example (invented)', createdAt: daysAgo(today, (c.startedDaysAgo ?? 5) + 10), updatedAt: daysAgo(today, 2),
      })
      await tx.insert(s.clientHandlers).values(c.handlers.map(h => ({ clientId, userId: seedId(`user:${h.key}`), relationship: h.relationship })))
      await tx.insert(s.dogs).values({
        id: seedId(`dog:${c.key}`), clientId, name: c.dog.name, breed: c.dog.breed, sex: c.dog.sex,
        dateOfBirth: isoDay(daysAgo(today, c.dog.ageDays)), source: c.dog.source, status: c.dog.status,
      })
      await seedDogProfile(tx, { key: c.key, dogId: seedId(`dog:${c.key}`), trainerId: seedId(`user:${c.trainer}`), status: c.dog.status, startedDaysAgo: c.startedDaysAgo, today, seedId })
    }
    await seedDiaries(tx, today, seedId)
    await seedSampleBanks(tx, { today, seedId, handlerOf: (key) => { const h = PEOPLE.find(p => p.key === CLIENTS.find(x => x.key === key)!.handlers[0]!.key)!; return { id: seedId(`user:${h.key}`), email: h.email, name: h.name } } })
    await seedTraining(tx, { today, seedId })
    await seedHomework(tx, { today, seedId, filesDir })
    // After the training seed: the fee schedule belongs to the default programme template.
    await seedInvoices(tx, today, seedId)
    await seedSchedule(tx, { today, seedId })
    const extra = opts.extraClients ?? 0
    if (extra > 0) await seedExtraClients(tx, extra, today)
  })
}

// Bulk clients for benchmarks: invented names from small lists, spread across the trainers.
async function seedExtraClients(tx: Parameters<Parameters<Database['transaction']>[0]>[0], n: number, today: Date) {
  const family = ['Ashdown', 'Birchall', 'Corrigan', 'Dunmore', 'Elgood', 'Farrant', 'Gethin', 'Hollis', 'Ingram', 'Jessop', 'Kendrew', 'Lucette', 'Marwood', 'Northey', 'Ormsby', 'Pellow', 'Quarrie', 'Rendle', 'Sewell', 'Tolley']
  const given = ['Alex', 'Bryony', 'Cal', 'Delphine', 'Eamon', 'Freya', 'Gus', 'Hattie', 'Ivo', 'Jude', 'Kit', 'Lottie', 'Milo', 'Nell', 'Otis', 'Pia']
  const dogsNames = ['Bramble', 'Clover', 'Dash', 'Ember', 'Fig', 'Hazel', 'Inky', 'Kip', 'Moss', 'Nutmeg', 'Olive', 'Rook', 'Sorrel', 'Tansy']
  const conditions = ['migraine', 'hypoglycaemia', 'seizure', 'other'] as const
  const statuses = ['intake', 'active', 'active', 'active', 'placed', 'aftercare'] as const
  const trainers = ['trainer', 'trainer2', 'trainer3'].map(k => seedId(`user:${k}`))
  const BATCH = 500
  for (let start = 0; start < n; start += BATCH) {
    const rows = []
    const dogRows = []
    const dogChanges = []
    const dogAssessmentRows = []
    for (let i = start; i < Math.min(n, start + BATCH); i++) {
      const id = seedId(`bulk-client:${i}`)
      const f = family[i % family.length]!
      rows.push({
        id, trainerId: trainers[i % trainers.length]!, householdName: `${f} household ${i + 1}`,
        personName: `${given[(i * 7) % given.length]} ${f}`, condition: conditions[i % conditions.length]!,
        status: statuses[i % statuses.length]!, programmeStartedOn: isoDay(daysAgo(today, (i * 13) % 700)),
        town: 'Bulkton', updatedAt: daysAgo(today, i % 90),
      })
      dogRows.push({ id: seedId(`bulk-dog:${i}`), clientId: id, name: dogsNames[(i * 3) % dogsNames.length]!, status: 'in-training' as const, acceptedOn: isoDay(daysAgo(today, ((i * 13) % 700) + 2)) })
      const history = bulkDogHistory({ dogId: seedId(`bulk-dog:${i}`), i, startedDaysAgo: (i * 13) % 700, trainerId: rows.at(-1)!.trainerId, today, seedId })
      dogChanges.push(...history.changes)
      dogAssessmentRows.push(history.assessment)
    }
    await tx.insert(s.clients).values(rows)
    await tx.insert(s.dogs).values(dogRows)
    await tx.insert(s.dogStatusChanges).values(dogChanges)
    await tx.insert(s.dogAssessments).values(dogAssessmentRows)
    await seedBulkTraining(tx, { today, seedId }, rows.map((r, k) => ({ clientId: r.id, dogId: seedId(`bulk-dog:${start + k}`), trainerId: r.trainerId, i: start + k })))
  }
}
