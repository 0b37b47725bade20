import { relations } from 'drizzle-orm'
import { labMemberships, labs, users } from './accounts'
import { datasetVersions, datasets, rateRecords } from './archive'
import { reviews } from './review'

// ── relations ───────────────────────────────────────────────────────────────────────────
export const labRelations = relations(labs, ({ many }) => ({
  memberships: many(labMemberships),
  datasets: many(datasets)
}))
export const membershipRelations = relations(labMemberships, ({ one }) => ({
  lab: one(labs, { fields: [labMemberships.labId], references: [labs.id] }),
  user: one(users, { fields: [labMemberships.userId], references: [users.id] })
}))
export const datasetRelations = relations(datasets, ({ one, many }) => ({
  lab: one(labs, { fields: [datasets.labId], references: [labs.id] }),
  versions: many(datasetVersions)
}))
export const versionRelations = relations(datasetVersions, ({ one, many }) => ({
  dataset: one(datasets, { fields: [datasetVersions.datasetId], references: [datasets.id] }),
  records: many(rateRecords),
  reviews: many(reviews)
}))
export const recordRelations = relations(rateRecords, ({ one }) => ({
  version: one(datasetVersions, { fields: [rateRecords.versionId], references: [datasetVersions.id] })
}))
