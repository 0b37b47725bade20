/**
 * Crosspoint's database schema (SQLite through libSQL). snake_case columns, camelCase keys,
 * named indexes, relations last. Auth tables keep @auth/drizzle-adapter's shape.
 * accounts.ts (people, labs, tokens) · archive.ts (datasets, versions, records) · review.ts (reviews,
 * comments, audit) · files.ts (uploads, reference data, mail, structures, data migrations) · relations.ts.
 */
export * from './accounts'
export * from './archive'
export * from './review'
export * from './usage'
export * from './files'
export * from './relations'
