/**
 * The two metadata formats the OAI-PMH endpoint disseminates, both written from the DataCite attributes the
 * registrar receives (one mapping, not three): simple Dublin Core (oai_dc, required by OAI-PMH 2.0 §3.4) and DataCite
 * kernel-4 XML wrapped as oai_datacite (the format DataCite's own OAI provider uses). XML is written with a small
 * escaper rather than a DOM library: the shapes are fixed and flat.
 */
import { dataciteJson, type CitableVersion } from './citation'

export const METADATA_FORMATS = [
  {
    prefix: 'oai_dc',
    schema: 'http://www.openarchives.org/OAI/2.0/oai_dc.xsd',
    namespace: 'http://www.openarchives.org/OAI/2.0/oai_dc/'
  },
  {
    prefix: 'oai_datacite',
    schema: 'http://schema.datacite.org/oai/oai-1.1/oai.xsd',
    namespace: 'http://schema.datacite.org/oai/oai-1.1/'
  }
] as const
export type MetadataPrefix = (typeof METADATA_FORMATS)[number]['prefix']

/** XML text and attribute escaping; characters XML 1.0 cannot carry at all are dropped. */
export function xmlText (s: unknown): string {
  return String(s ?? '')
    .replace(/[^\t\n\r\u0020-\uD7FF\uE000-\uFFFD\u{10000}-\u{10FFFF}]/gu, '')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
}
const el = (name: string, text: unknown, attrs: Record<string, string | undefined> = {}) => {
  const a = Object.entries(attrs)
    .filter(([, v]) => v !== undefined && v !== '')
    .map(([k, v]) => ` ${k}="${xmlText(v)}"`)
    .join('')
  return `<${name}${a}>${xmlText(text)}</${name}>`
}

export function oaiDc (v: CitableVersion): string {
  const a = dataciteJson(v).data.attributes
  const parts = [
    el('dc:title', v.title),
    ...a.creators.map(c => el('dc:creator', c.name)),
    ...a.subjects.map(s => el('dc:subject', s.subject)),
    ...(v.description ? [el('dc:description', v.description)] : []),
    el('dc:publisher', a.publisher),
    ...a.dates.filter(d => d.dateType === 'Issued').map(d => el('dc:date', d.date)),
    el('dc:type', 'Dataset'),
    ...(v.doi ? [el('dc:identifier', `https://doi.org/${v.doi}`)] : []),
    el('dc:identifier', v.landingUrl),
    ...a.relatedIdentifiers.map(r =>
      el('dc:relation', r.relatedIdentifierType === 'DOI' ? `https://doi.org/${r.relatedIdentifier}` : r.relatedIdentifier)),
    ...a.rightsList.map(r => el('dc:rights', r.rightsUri)),
    el('dc:format', 'application/zip')
  ]
  return '<oai_dc:dc xmlns:oai_dc="http://www.openarchives.org/OAI/2.0/oai_dc/" xmlns:dc="http://purl.org/dc/elements/1.1/" '
    + 'xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:schemaLocation="http://www.openarchives.org/OAI/2.0/oai_dc/ '
    + `http://www.openarchives.org/OAI/2.0/oai_dc.xsd">${parts.join('')}</oai_dc:dc>`
}

/** DataCite kernel-4 XML of a version (the XML twin of the JSON the registrar receives). */
export function dataciteXml (v: CitableVersion): string {
  const a = dataciteJson(v).data.attributes
  const creators = a.creators.map((c) => {
    const ids = c.nameIdentifiers.map(n =>
      el('nameIdentifier', n.nameIdentifier, { nameIdentifierScheme: n.nameIdentifierScheme, schemeURI: n.schemeUri }))
    const aff = c.affiliation.map(x => el('affiliation', x.name))
    const given = 'givenName' in c && c.givenName ? [el('givenName', c.givenName)] : []
    const names = 'familyName' in c && c.familyName ? [...given, el('familyName', c.familyName)] : []
    return `<creator>${el('creatorName', c.name, { nameType: c.nameType })}${names.join('')}`
      + `${ids.join('')}${aff.join('')}</creator>`
  })
  const list = (outer: string, items: string[]) => (items.length ? `<${outer}>${items.join('')}</${outer}>` : '')
  return '<resource xmlns="http://datacite.org/schema/kernel-4" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" '
    + 'xsi:schemaLocation="http://datacite.org/schema/kernel-4 http://schema.datacite.org/meta/kernel-4.3/metadata.xsd">'
    + el('identifier', v.doi ?? '', { identifierType: 'DOI' })
    + `<creators>${creators.join('')}</creators>`
    + list('titles', a.titles.map(t => el('title', t.title)))
    + el('publisher', a.publisher)
    + el('publicationYear', a.publicationYear)
    + el('resourceType', a.types.resourceType, { resourceTypeGeneral: a.types.resourceTypeGeneral })
    + list('subjects', a.subjects.map(s => el('subject', s.subject)))
    + list('dates', a.dates.map(d => el('date', d.date, { dateType: d.dateType, dateInformation: d.dateInformation })))
    + list('relatedIdentifiers', a.relatedIdentifiers.map(r =>
      el('relatedIdentifier', r.relatedIdentifier, { relatedIdentifierType: r.relatedIdentifierType, relationType: r.relationType })))
    + el('version', a.version)
    + list('rightsList', a.rightsList.map(r =>
      el('rights', r.rights, {
        rightsURI: r.rightsUri, rightsIdentifier: r.rightsIdentifier, rightsIdentifierScheme: r.rightsIdentifierScheme
      })))
      + list('descriptions', a.descriptions.map(d => el('description', d.description, { descriptionType: d.descriptionType })))
      + list('fundingReferences', a.fundingReferences.map(f =>
        `<fundingReference>${el('funderName', f.funderName)}`
        + `${'awardNumber' in f && f.awardNumber ? el('awardNumber', f.awardNumber) : ''}</fundingReference>`))
      + '</resource>'
}

export function oaiDatacite (v: CitableVersion): string {
  return '<oai_datacite xmlns="http://schema.datacite.org/oai/oai-1.1/" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" '
    + 'xsi:schemaLocation="http://schema.datacite.org/oai/oai-1.1/ http://schema.datacite.org/oai/oai-1.1/oai.xsd">'
    + `<schemaVersion>4.3</schemaVersion><datacentreSymbol>CROSSPOINT</datacentreSymbol><payload>${dataciteXml(v)}</payload></oai_datacite>`
}

export function metadataOf (v: CitableVersion, prefix: MetadataPrefix): string {
  return prefix === 'oai_dc' ? oaiDc(v) : oaiDatacite(v)
}
