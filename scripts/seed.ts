import { migrateDatabase, openDatabase, prepareDatabase, DEFAULT_DATABASE_URL } from '../server/database/client'
import { seedDemo, PEOPLE, DEMO_PASSWORD, BUSINESS_NAME } from './lib/seed-data'

const url = process.env.DATABASE_URL || DEFAULT_DATABASE_URL
const extra = Number(process.argv.find(a => a.startsWith('--extra-clients='))?.split('=')[1] ?? 0)
const { client, db } = openDatabase(url, process.env.DATABASE_AUTH_TOKEN)
await prepareDatabase(client, url)
await migrateDatabase(db)
await seedDemo(db, { extraClients: extra })
console.log(`Seeded ${url} with the ${BUSINESS_NAME} demo (${PEOPLE.length} people${extra ? `, ${extra} extra clients` : ''}); password: ${DEMO_PASSWORD}`)
client.close()
