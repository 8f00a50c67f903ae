import { migrateDatabase, openDatabase, prepareDatabase, DEFAULT_DATABASE_URL } from '../server/database/client'

const url = process.env.DATABASE_URL || DEFAULT_DATABASE_URL
const { client, db } = openDatabase(url, process.env.DATABASE_AUTH_TOKEN)
await prepareDatabase(client, url)
await migrateDatabase(db)
console.log(`Migrated ${url}`)
client.close()
