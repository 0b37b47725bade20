/**
 * Review and publication: the curator queue and review view (queue.ts), return and accept with identifiers
 * (decisions.ts), new versions, corrections and withdrawal (versions.ts), on shared guards (common.ts).
 * Every transition is one transaction, audited through the one audit helper, and mailed.
 */
export * from './common'
export * from './queue'
export * from './decisions'
export * from './versions'
