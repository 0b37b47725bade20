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
  labName: string
  landingUrl: string
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
    labName,
    landingUrl: publicUrl(`/datasets/${v.datasetId}?version=${v.versionNumber}`)
  }
}
export const CITATION_FORMATS = ['bibtex', 'ris', 'csl-json', 'datacite-json', 'cff'] as const
export type CitationFormat = (typeof CITATION_FORMATS)[number]

export function splitName (c: Creator): { family: string, given: string } {
  if (c.name.includes(',')) {
    const [f, g] = c.name.split(',')
    return { family: f!.trim(), given: (g ?? '').trim() }
  }
  const parts = c.name.trim().split(/\s+/)
  return parts.length > 1 ? { family: parts.pop()!, given: parts.join(' ') } : { family: parts[0] ?? '', given: '' }
}
export const year = (v: CitableVersion) => (v.publishedAt ?? new Date()).getUTCFullYear()
export const doiUrl = (d: string) => `https://doi.org/${d}`

export function dataciteJson (v: CitableVersion) {
  const m = v.metadata
  return {
    data: {
      type: 'dois',
      attributes: {
        doi: v.doi,
        url: v.landingUrl,
        types: { resourceTypeGeneral: 'Dataset', resourceType: 'Electron-transfer rate records' },
        titles: [{ title: v.title }],
        creators: m.creators.map(c => ({
          name: c.name,
          nameType: 'Personal',
          familyName: splitName(c).family,
          givenName: splitName(c).given,
          nameIdentifiers: c.orcid
            ? [
                {
                  nameIdentifier: `https://orcid.org/${c.orcid}`,
                  nameIdentifierScheme: 'ORCID',
                  schemeUri: 'https://orcid.org'
                }
              ]
            : [],
          affiliation: c.affiliation
            ? [
                {
                  name: c.affiliation,
                  ...(c.rorId ? { affiliationIdentifier: c.rorId, affiliationIdentifierScheme: 'ROR' } : {})
                }
              ]
            : []
        })),
        publisher: { name: PUBLISHER },
        publicationYear: year(v),
        version: String(v.versionNumber),
        descriptions: v.description ? [{ description: v.description, descriptionType: 'Abstract' }] : [],
        subjects: (m.keywords ?? []).map(k => ({ subject: k })),
        rightsList: [
          { rightsIdentifier: v.license, rightsIdentifierScheme: 'SPDX', schemeUri: 'https://spdx.org/licenses/' }
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
        }))
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
      author: v.metadata.creators.map(splitName),
      issued: { 'date-parts': [[year(v)]] },
      publisher: PUBLISHER,
      version: String(v.versionNumber),
      ...(v.doi ? { DOI: v.doi, URL: doiUrl(v.doi) } : { URL: v.landingUrl }),
      abstract: v.description || undefined,
      license: v.license
    }
  ]
}

/** Escapes BibTeX specials; braces keep the title's capitals. */
