/** BibTeX, RIS, CITATION.cff and schema.org JSON-LD of a published version, and one entry point by format. */
import { oneLine } from '../../../shared/text'
import { stringify as toYaml } from 'yaml'
import {
  type CitableVersion, type CitationFormat, PUBLISHER, cslJson, dataciteJson, doiUrl, licenceUrl, supplementedArticles, year
} from './citation'
import { creatorParts } from '../../../shared/records/creators'
import type { Creator } from '../../../shared/records/types'

/** "Family, Given" for a person; a whole name braced so BibTeX takes it as one family name. */
function bibName (c: Creator): string {
  const p = creatorParts(c)
  if (p.kind !== 'person') return `{${bib(p.name)}}`
  return p.given ? `${bib(p.family)}, ${bib(p.given)}` : bib(p.family)
}
function risName (c: Creator): string {
  const p = creatorParts(c)
  return p.kind === 'person' ? (p.given ? `${p.family}, ${p.given}` : p.family) : p.name
}
/** A CFF author: a person with name parts, or an entity (organisation); a name without parts stays whole. */
function cffAuthor (c: Creator): Record<string, string> {
  const p = creatorParts(c)
  const extra = {
    ...(c.orcid && p.kind !== 'organization' ? { orcid: `https://orcid.org/${c.orcid}` } : {}),
    ...(c.affiliation && p.kind !== 'organization' ? { affiliation: c.affiliation } : {})
  }
  if (p.kind === 'organization') return { name: p.name }
  if (p.kind === 'literal') return { 'family-names': p.name, ...extra }
  return { 'family-names': p.family, ...(p.given ? { 'given-names': p.given } : {}), ...extra }
}

function bib (s: string): string {
  return s
    .replace(/\\/g, '\\textbackslash{}')
    .replace(/([{}&%$#_])/g, '\\$1')
    .replace(/~/g, '\\textasciitilde{}')
    .replace(/\^/g, '\\textasciicircum{}')
}

export function bibtex (v: CitableVersion): string {
  const key = `crosspoint_${v.datasetId}_v${v.versionNumber}`
  const fields: [string, string][] = [
    ['author', v.metadata.creators.map(bibName).join(' and ')],
    ['title', `{${bib(v.title)}}`],
    ['year', String(year(v))],
    ['publisher', PUBLISHER],
    ['version', String(v.versionNumber)],
    ...(v.doi
      ? ([
          ['doi', v.doi],
          ['url', doiUrl(v.doi)]
        ] as [string, string][])
      : ([['url', v.landingUrl]] as [string, string][])),
    ['note', [`Licence: ${v.license}`, ...supplementedArticles(v).map(d => `Supplement to ${bib(doiUrl(d))}`)].join('. ')]
  ]
  return `@misc{${key},\n${fields.map(([k, val]) => `  ${k} = {${val}}`).join(',\n')}\n}\n`
}

export function ris (v: CitableVersion): string {
  const lines = [
    'TY  - DATA',
    ...v.metadata.creators.map(c => `AU  - ${risName(c)}`),
    `TI  - ${v.title}`,
    `PY  - ${year(v)}`,
    `PB  - ${PUBLISHER}`,
    `ET  - ${v.versionNumber}`,
    ...(v.doi ? [`DO  - ${v.doi}`, `UR  - ${doiUrl(v.doi)}`] : [`UR  - ${v.landingUrl}`]),
    ...(v.metadata.keywords ?? []).map(k => `KW  - ${k}`),
    `N1  - Licence: ${v.license}`,
    ...supplementedArticles(v).map(d => `N1  - Supplement to ${doiUrl(d)}`)
  ]
  // each tag one line, whatever was stored: a line break in a value cannot open another record
  return [...lines.map(oneLine), 'ER  - '].join('\r\n') + '\r\n'
}

export function cff (v: CitableVersion): string {
  return toYaml(cffDoc(v))
}

export function cffDoc (v: CitableVersion): Record<string, unknown> {
  const doc: Record<string, unknown> = {
    'cff-version': '1.2.0',
    'message': 'If you use these data, please cite them as below.',
    'type': 'dataset',
    'title': v.title,
    'authors': v.metadata.creators.map(cffAuthor),
    'version': String(v.versionNumber),
    ...(v.doi ? { doi: v.doi } : {}),
    ...(v.publishedAt ? { 'date-released': v.publishedAt.toISOString().slice(0, 10) } : {}),
    'license': v.license,
    'url': v.landingUrl,
    ...(v.metadata.keywords?.length ? { keywords: v.metadata.keywords } : {}),
    ...(v.description ? { abstract: v.description } : {}),
    ...(v.conceptDoi || supplementedArticles(v).length
      ? {
          identifiers: [
            ...(v.conceptDoi ? [{ type: 'doi', value: v.conceptDoi, description: 'All versions of this dataset' }] : []),
            ...supplementedArticles(v).map(d => ({ type: 'doi', value: d, description: 'The article these data supplement' }))
          ]
        }
      : {})
  }
  return doc
}

/** CITATION.cff for a selection of records: cite the contributing datasets, listed as references. */
export function selectionCff (cited: CitableVersion[], title: string, url: string): string {
  const refs = cited.map((c) => {
    const { 'cff-version': _v, message: _m, ...ref } = cffDoc(c)
    // CFF 1.2.0 reference types have no "dataset": a dataset is "data"
    return { ...ref, type: 'data' } as Record<string, unknown>
  })
  const licences = [...new Set(cited.map(c => c.license))]
  const authors = [
    ...new Map(refs.flatMap(r => r.authors as Record<string, string>[]).map(a => [JSON.stringify(a), a])).values()
  ]
  return toYaml({
    'cff-version': '1.2.0',
    'message': 'This is a selection of published records. Cite each dataset listed under references.',
    'type': 'dataset',
    title,
    'authors': authors.length ? authors : [{ name: PUBLISHER }],
    'date-released': new Date().toISOString().slice(0, 10),
    url,
    ...(licences.length ? { license: licences.length === 1 ? licences[0] : licences } : {}),
    'references': refs
  })
}

/** What the records of a version measure, as schema.org PropertyValues (units as UN/CEFACT common codes). */
const VARIABLES = [
  { name: 'rate constant', unitText: 's⁻¹ (first order) or M⁻¹ s⁻¹ (second order)', description: 'Electron-transfer rate constant k' },
  { name: 'driving force', unitCode: 'A53', unitText: 'eV', description: 'Standard free-energy change ΔG° of the electron transfer' },
  { name: 'temperature', unitCode: 'KEL', unitText: 'K', description: 'Temperature of the measurement' },
  { name: 'donor–acceptor distance', unitCode: 'A11', unitText: 'Å', description: 'Centre-to-centre distance' }
]

/**
 * schema.org Dataset for the landing page's head (what dataset search engines read). A withdrawn version keeps its
 * description, marked with creativeWorkStatus, and offers no download.
 */
export function jsonLd (v: CitableVersion, techniques: string[] = []) {
  const id = v.doi ? doiUrl(v.doi) : v.landingUrl
  const withdrawn = !!v.withdrawnAt
  // nothing to download while withdrawn or under embargo
  const downloadable = !withdrawn && !(v.embargoUntil && v.embargoUntil > new Date().toISOString().slice(0, 10))
  return {
    '@context': 'https://schema.org',
    '@type': 'Dataset',
    '@id': id,
    'name': v.title,
    'description': v.description || v.title,
    'url': v.landingUrl,
    ...(v.doi ? { identifier: doiUrl(v.doi), sameAs: doiUrl(v.doi) } : {}),
    'version': String(v.versionNumber),
    'license': licenceUrl(v.license),
    ...(v.publishedAt ? { datePublished: v.publishedAt.toISOString().slice(0, 10) } : {}),
    ...(v.metadata.keywords?.length ? { keywords: v.metadata.keywords } : {}),
    'creator': v.metadata.creators.map((c) => {
      const p = creatorParts(c)
      if (p.kind === 'organization') return { '@type': 'Organization', 'name': p.name }
      return {
        '@type': 'Person',
        'name': p.kind === 'person' && p.given ? `${p.given} ${p.family}` : p.kind === 'person' ? p.family : p.name,
        ...(p.kind === 'person' ? { familyName: p.family, ...(p.given ? { givenName: p.given } : {}) } : {}),
        ...(c.orcid ? { '@id': `https://orcid.org/${c.orcid}` } : {}),
        ...(c.affiliation ? { affiliation: { '@type': 'Organization', 'name': c.affiliation } } : {})
      }
    }),
    'publisher': { '@type': 'Organization', 'name': PUBLISHER },
    'includedInDataCatalog': { '@type': 'DataCatalog', 'name': PUBLISHER, 'url': v.datasetUrl.replace(/\/datasets\/\d+$/, '/datasets') },
    'isAccessibleForFree': true,
    'variableMeasured': VARIABLES.map(x => ({ '@type': 'PropertyValue', ...x })),
    ...(techniques.length ? { measurementTechnique: techniques } : {}),
    ...(v.metadata.funding?.length
      ? { funder: v.metadata.funding.map(f => ({ '@type': 'Organization', 'name': f.funderName })) }
      : {}),
    ...(supplementedArticles(v).length
      ? { citation: supplementedArticles(v).map(d => ({ '@type': 'ScholarlyArticle', '@id': doiUrl(d), 'identifier': doiUrl(d) })) }
      : {}),
    ...(v.conceptDoi ? { isPartOf: { '@type': 'Dataset', '@id': doiUrl(v.conceptDoi), 'name': `${v.title} (all versions)` } } : {}),
    ...(withdrawn ? { creativeWorkStatus: 'Withdrawn' } : {}),
    ...(!downloadable
      ? {}
      : {
          distribution: [
            {
              '@type': 'DataDownload',
              'encodingFormat': 'application/zip',
              'name': 'BagIt bundle: records as CSV and JSON, schemas, citations, checksums',
              'contentUrl': v.datasetUrl.replace('/datasets/', '/api/v1/datasets/') + `/bundle?version=${v.versionNumber}`
            }
          ]
        })
  }
}

export function renderCitation (v: CitableVersion, format: CitationFormat): { body: string, type: string, ext: string } {
  switch (format) {
    case 'bibtex':
      return { body: bibtex(v), type: 'application/x-bibtex; charset=utf-8', ext: 'bib' }
    case 'ris':
      return { body: ris(v), type: 'application/x-research-info-systems; charset=utf-8', ext: 'ris' }
    case 'csl-json':
      return {
        body: JSON.stringify(cslJson(v), null, 2),
        type: 'application/vnd.citationstyles.csl+json; charset=utf-8',
        ext: 'json'
      }
    case 'datacite-json':
      return {
        body: JSON.stringify(dataciteJson(v), null, 2),
        type: 'application/vnd.api+json; charset=utf-8',
        ext: 'json'
      }
    case 'cff':
      return { body: cff(v), type: 'application/x-yaml; charset=utf-8', ext: 'cff' }
  }
}
