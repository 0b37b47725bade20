/**
 * Query-string schemas of the GET routes, one object each: the route validates with it and the OpenAPI document
 * lists its properties as the operation's query parameters (names, types, bounds, enums, required).
 */
import { pagingProperties } from './params'
import { CITATION_FORMATS } from '../publishing/citation'

export const DATASET_LIST_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: {
    q: { type: 'string', maxLength: 200, description: 'words of the title or lab' },
    state: { enum: ['draft', 'submitted', 'returned', 'published', 'withdrawn'] },
    lab: { type: 'integer', minimum: 1 },
    ...pagingProperties
  }
}
export const CITATION_QUERY = {
  type: 'object',
  required: ['format'],
  additionalProperties: false,
  properties: {
    format: { enum: [...CITATION_FORMATS] },
    version: { type: 'integer', minimum: 1, description: 'a published version (default: the newest)' }
  }
}
export const BUNDLE_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: { version: { type: 'integer', minimum: 1, description: 'a published version (default: the newest)' } }
}
export const SIMILAR_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: { limit: { type: 'integer', minimum: 1, maximum: 100 } }
}
export const REVIEW_QUEUE_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: { lab: { type: 'integer', minimum: 1 }, q: { type: 'string', maxLength: 200 } }
}
export const SYSTEM_LIST_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: {
    minLabs: { type: 'integer', minimum: 1, maximum: 100, description: 'systems measured by at least this many labs (default 2)' },
    q: { type: 'string', maxLength: 200, description: 'words of the donor, acceptor, bridge or medium' },
    discrepant: { enum: ['true', 'false'], description: 'only systems with (true) or without (false) a flagged record' },
    ids: { type: 'string', pattern: '^\\d+(,\\d+){0,4999}$', description: 'comma-separated record ids: the systems holding any of them' },
    ...pagingProperties
  }
}
const MONTH = { type: 'string', pattern: '^(19|20)\\d{2}-(0[1-9]|1[0-2])$' }
export const USAGE_QUERY = {
  type: 'object',
  additionalProperties: false,
  properties: {
    from: { ...MONTH, description: 'first month counted, YYYY-MM (default: eleven months before `until`)' },
    until: { ...MONTH, description: 'last month counted, YYYY-MM (default: this month)' }
  }
}
const MONTH_OR_DAY = { type: 'string', pattern: '^(19|20)\\d{2}-(0[1-9]|1[0-2])(-(0[1-9]|[12]\\d|3[01]))?$' }
export const USAGE_REPORT_QUERY = {
  type: 'object',
  additionalProperties: false,
  required: ['begin', 'end'],
  properties: {
    begin: { ...MONTH_OR_DAY, description: 'YYYY-MM or YYYY-MM-DD: the report starts with this month' },
    end: { ...MONTH_OR_DAY, description: 'YYYY-MM or YYYY-MM-DD: the report ends with this month' }
  }
}
