/**
 * A creator's name in the parts citation formats want. Creators are entered as family and given names (people) or
 * one name (organisations); older entries hold only `name`. A name is never split at a space: "García Márquez" and
 * "van der Berg" would lose or misplace a part, so a name without parts or a comma is passed on whole ("literal").
 */
import type { Creator } from './types'

export type CreatorParts
  = | { kind: 'person', family: string, given: string }
    | { kind: 'organization', name: string }
    | { kind: 'literal', name: string }

export function creatorParts (c: Creator): CreatorParts {
  if (c.nameType === 'Organizational') return { kind: 'organization', name: c.name.trim() }
  if (c.familyName?.trim()) return { kind: 'person', family: c.familyName.trim(), given: c.givenName?.trim() ?? '' }
  const comma = c.name.indexOf(',')
  if (comma > 0) return { kind: 'person', family: c.name.slice(0, comma).trim(), given: c.name.slice(comma + 1).trim() }
  return { kind: 'literal', name: c.name.trim() }
}

/** The display and citation form: "Family, Given" for people, the name for organisations. */
export function creatorName (c: Creator): string {
  const p = creatorParts(c)
  return p.kind === 'person' ? (p.given ? `${p.family}, ${p.given}` : p.family) : p.name
}
