// The one schema: every table, grouped by feature in ./tables. drizzle-kit reads this file.
export * from './tables/core'
export * from './tables/dogs'
export * from './tables/documents'
export * from './tables/settings'
export * from './tables/samples'
export * from './tables/diary'
export * from './tables/invoices'
export * from './tables/training'
