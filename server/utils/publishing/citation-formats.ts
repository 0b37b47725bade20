/** BibTeX, RIS, CITATION.cff and schema.org JSON-LD of a published version, and one entry point by format. */
import { oneLine } from '../../../shared/text'
import { stringify as toYaml } from 'yaml'
import { type CitableVersion, type CitationFormat, PUBLISHER, cslJson, dataciteJson, doiUrl, splitName, year } from './citation'

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
    [
      'author',
      v.metadata.creators
        .map((c) => {
          const n = splitName(c)
          return n.given ? `${bib(n.family)}, ${bib(n.given)}` : bib(n.family)
        })
        .join(' and ')
    ],
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
    ['note', `Licence: ${v.license}`]
  ]
  return `@misc{${key},\n${fields.map(([k, val]) => `  ${k} = {${val}}`).join(',\n')}\n}\n`
}

export function ris (v: CitableVersion): string {
  const lines = [
    'TY  - DATA',
    ...v.metadata.creators.map((c) => {
      const n = splitName(c)
      return `AU  - ${n.given ? `${n.family}, ${n.given}` : n.family}`
    }),
    `TI  - ${v.title}`,
    `PY  - ${year(v)}`,
    `PB  - ${PUBLISHER}`,
    `ET  - ${v.versionNumber}`,
    ...(v.doi ? [`DO  - ${v.doi}`, `UR  - ${doiUrl(v.doi)}`] : [`UR  - ${v.landingUrl}`]),
    ...(v.metadata.keywords ?? []).map(k => `KW  - ${k}`),
    `N1  - Licence: ${v.license}`
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
    'authors': v.metadata.creators.map((c) => {
      const n = splitName(c)
      return {
        'family-names': n.family,
        ...(n.given ? { 'given-names': n.given } : {}),
        ...(c.orcid ? { orcid: `https://orcid.org/${c.orcid}` } : {}),
        ...(c.affiliation ? { affiliation: c.affiliation } : {})
      }
    }),
    'version': String(v.versionNumber),
    ...(v.doi ? { doi: v.doi } : {}),
    ...(v.publishedAt ? { 'date-released': v.publishedAt.toISOString().slice(0, 10) } : {}),
    'license': v.license,
    'url': v.landingUrl,
    ...(v.metadata.keywords?.length ? { keywords: v.metadata.keywords } : {}),
    ...(v.description ? { abstract: v.description } : {}),
    ...(v.conceptDoi
      ? { identifiers: [{ type: 'doi', value: v.conceptDoi, description: 'All versions of this dataset' }] }
      : {})
  }
  return doc
}

/** CITATION.cff for a selection of records: cite the contributing datasets, listed as references. */
export function selectionCff (cited: CitableVersion[], title: string, url: string): string {
  const refs = cited.map((c) => {
    const { 'cff-version': _v, message: _m, ...ref } = cffDoc(c)
    return ref
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

/** schema.org Dataset for the landing page's head. */
export function jsonLd (v: CitableVersion) {
  return {
    '@context': 'https://schema.org',
    '@type': 'Dataset',
    'name': v.title,
    'description': v.description || v.title,
    'url': v.landingUrl,
    ...(v.doi ? { identifier: doiUrl(v.doi), sameAs: doiUrl(v.doi) } : {}),
    'version': String(v.versionNumber),
    'license': `https://spdx.org/licenses/${v.license}.html`,
    'datePublished': v.publishedAt?.toISOString().slice(0, 10),
    'keywords': v.metadata.keywords,
    'creator': v.metadata.creators.map(c => ({
      '@type': 'Person',
      'name': c.name,
      ...(c.orcid ? { '@id': `https://orcid.org/${c.orcid}` } : {}),
      ...(c.affiliation ? { affiliation: { '@type': 'Organization', 'name': c.affiliation } } : {})
    })),
    'publisher': { '@type': 'Organization', 'name': PUBLISHER },
    'isAccessibleForFree': true
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
