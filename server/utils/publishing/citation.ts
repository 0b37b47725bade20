/**
 * Citations of a published dataset version: DataCite JSON (what the registrar receives), CSL-JSON,
 * BibTeX, RIS, CITATION.cff (Citation File Format 1.2.0) and schema.org Dataset JSON-LD.
 * Written here, not through a citation library, because every format is a short, fixed mapping
 * from our metadata; the tests parse each with general-purpose parsers (citation-js, yaml) and
 * validate CITATION.cff against the official CFF 1.2.0 schema.
 *
 * This file: the citable shape, DataCite JSON and CSL-JSON; citation-formats.ts: BibTeX, RIS, CFF, JSON-LD.
 */
import type { Creator, DatasetMetadataV1 } from '../../../shared/records/types'
import { creatorParts } from '../../../shared/records/creators'
import { publicUrl } from '../services/mail'

export interface CitableVersion {
  datasetId: number
  versionNumber: number
  title: string
  description: string
  metadata: DatasetMetadataV1
  license: string
  doi: string | null
  conceptDoi: string | null
  publishedAt: Date | null
  /** set on a withdrawn version (its tombstone stays citable) */
  withdrawnAt: Date | null
  embargoUntil: string | null
  labName: string
  landingUrl: string
  /** the version-less landing page (canonical) */
  datasetUrl: string
}

export const PUBLISHER = 'Crosspoint'

/** A stored dataset version (plus its dataset's concept DOI and lab) in the shape every format takes. */
export function toCitable (
  v: {
    datasetId: number
    versionNumber: number
    title: string
    description: string
    metadata: unknown
    license: string
    doi: string | null
    publishedAt: Date | null
    withdrawnAt?: Date | null
    embargoUntil?: string | null
  },
  conceptDoi: string | null,
  labName: string
): CitableVersion {
  return {
    datasetId: v.datasetId,
    versionNumber: v.versionNumber,
    title: v.title,
    description: v.description,
    metadata: v.metadata as DatasetMetadataV1,
    license: v.license,
    doi: v.doi,
    conceptDoi,
    publishedAt: v.publishedAt,
    withdrawnAt: v.withdrawnAt ?? null,
    embargoUntil: v.embargoUntil ?? null,
    labName,
    landingUrl: publicUrl(`/datasets/${v.datasetId}?version=${v.versionNumber}`),
    datasetUrl: publicUrl(`/datasets/${v.datasetId}`)
  }
}
export const CITATION_FORMATS = ['bibtex', 'ris', 'csl-json', 'datacite-json', 'cff'] as const
export type CitationFormat = (typeof CITATION_FORMATS)[number]

/** A creator as CSL-JSON names one: family and given parts, or the whole name as a literal. */
export function cslName (c: Creator): { family: string, given?: string } | { literal: string } {
  const p = creatorParts(c)
  return p.kind === 'person' ? { family: p.family, ...(p.given ? { given: p.given } : {}) } : { literal: p.name }
}
/** The article these data supplement (the DOIs of related works with that relation). */
export function supplementedArticles (v: CitableVersion): string[] {
  return (v.metadata.relatedIdentifiers ?? [])
    .filter(r => r.relationType === 'IsSupplementTo' && r.identifierType === 'DOI')
    .map(r => r.identifier)
}
/** SPDX identifiers of the licences offered, with their names. */
export const LICENCE_NAMES: Record<string, string> = {
  'CC-BY-4.0': 'Creative Commons Attribution 4.0 International',
  'CC0-1.0': 'Creative Commons Zero v1.0 Universal',
  'CC-BY-SA-4.0': 'Creative Commons Attribution Share Alike 4.0 International',
  'ODC-By-1.0': 'Open Data Commons Attribution License v1.0',
  'PDDL-1.0': 'Open Data Commons Public Domain Dedication & License 1.0'
}
export const licenceUrl = (spdx: string) => `https://spdx.org/licenses/${spdx}.html`
export const year = (v: CitableVersion) => (v.publishedAt ?? new Date()).getUTCFullYear()
export const doiUrl = (d: string) => `https://doi.org/${d}`

const day = (d: Date) => d.toISOString().slice(0, 10)

/**
 * DataCite JSON as the REST API takes it: `attributes` hold the DataCite Metadata Schema 4.3 properties (valid against
 * its JSON schema) plus the REST-only `doi` and `url`.
 */
export function dataciteJson (v: CitableVersion) {
  const m = v.metadata
  const issued = v.publishedAt ? day(v.publishedAt) : undefined
  const available = m.embargoUntil && issued && m.embargoUntil > issued ? m.embargoUntil : issued
  return {
    data: {
      type: 'dois',
      attributes: {
        doi: v.doi,
        url: v.landingUrl,
        identifiers: v.doi ? [{ identifier: v.doi, identifierType: 'DOI' }] : [],
        types: { resourceTypeGeneral: 'Dataset', resourceType: 'Electron-transfer rate records' },
        titles: [{ title: v.title }],
        creators: m.creators.map((c) => {
          const p = creatorParts(c)
          return {
            name: p.kind === 'person' ? (p.given ? `${p.family}, ${p.given}` : p.family) : p.name,
            nameType: p.kind === 'organization' ? 'Organizational' : 'Personal',
            ...(p.kind === 'person' ? { familyName: p.family, ...(p.given ? { givenName: p.given } : {}) } : {}),
            nameIdentifiers: c.orcid
              ? [{ nameIdentifier: `https://orcid.org/${c.orcid}`, nameIdentifierScheme: 'ORCID', schemeUri: 'https://orcid.org' }]
              : [],
            affiliation: c.affiliation
              ? [
                  {
                    name: c.affiliation,
                    ...(c.rorId
                      ? { affiliationIdentifier: c.rorId, affiliationIdentifierScheme: 'ROR', schemeUri: 'https://ror.org' }
                      : {})
                  }
                ]
              : []
          }
        }),
        publisher: PUBLISHER,
        publicationYear: String(year(v)),
        dates: [
          ...(issued ? [{ date: issued, dateType: 'Issued' }] : []),
          ...(available ? [{ date: available, dateType: 'Available' }] : []),
          ...(v.withdrawnAt
            ? [{ date: day(v.withdrawnAt), dateType: 'Withdrawn', dateInformation: 'Withdrawn; the landing page remains' }]
            : [])
        ],
        version: String(v.versionNumber),
        descriptions: v.description ? [{ description: v.description, descriptionType: 'Abstract' }] : [],
        subjects: (m.keywords ?? []).map(k => ({ subject: k })),
        rightsList: [
          {
            rights: LICENCE_NAMES[v.license] ?? v.license,
            rightsUri: licenceUrl(v.license),
            rightsIdentifier: v.license,
            rightsIdentifierScheme: 'SPDX',
            schemeUri: 'https://spdx.org/licenses/'
          }
        ],
        relatedIdentifiers: [
          ...(m.relatedIdentifiers ?? []).map(r => ({
            relatedIdentifier: r.identifier,
            relatedIdentifierType: r.identifierType,
            relationType: r.relationType
          })),
          ...(v.conceptDoi
            ? [{ relatedIdentifier: v.conceptDoi, relatedIdentifierType: 'DOI', relationType: 'IsVersionOf' }]
            : [])
        ],
        fundingReferences: (m.funding ?? []).map(f => ({
          funderName: f.funderName,
          ...(f.awardNumber ? { awardNumber: f.awardNumber } : {})
        })),
        schemaVersion: 'http://datacite.org/schema/kernel-4'
      }
    }
  }
}

export function cslJson (v: CitableVersion) {
  return [
    {
      id: `crosspoint-${v.datasetId}-v${v.versionNumber}`,
      type: 'dataset',
      title: v.title,
      author: v.metadata.creators.map(cslName),
      issued: { 'date-parts': [[year(v)]] },
      publisher: PUBLISHER,
      version: String(v.versionNumber),
      ...(v.doi ? { DOI: v.doi, URL: doiUrl(v.doi) } : { URL: v.landingUrl }),
      abstract: v.description || undefined,
      // CSL-JSON has no licence or related-work variable: both go into the note
      note: [`Licence: ${v.license}`, ...supplementedArticles(v).map(d => `Supplement to https://doi.org/${d}`)].join('. ')
    }
  ]
}

/** Escapes BibTeX specials; braces keep the title's capitals. */
