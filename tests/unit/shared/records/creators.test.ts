/**
 * Creator names in citations. The cases are name forms every citation style guide discusses (compound Spanish
 * surnames, Dutch particles, organisations as authors — common practice); each is checked in the formats people
 * import: CSL-JSON names, BibTeX author lists read back by citation-js, DataCite nameType.
 */
import { describe, expect, it } from 'vitest'
import { Cite } from '@citation-js/core'
import '@citation-js/plugin-bibtex'
import { creatorName, creatorParts } from '../../../../shared/records/creators'
import { cslJson, dataciteJson, type CitableVersion } from '../../../../server/utils/publishing/citation'
import { bibtex, cffDoc } from '../../../../server/utils/publishing/citation-formats'
import type { Creator } from '../../../../shared/records/types'

const version = (creators: Creator[]): CitableVersion => ({
  datasetId: 1, versionNumber: 1, title: 'Names', description: '', license: 'CC-BY-4.0', doi: '10.99999/x.1', conceptDoi: null,
  publishedAt: new Date('2026-01-02T00:00:00Z'), withdrawnAt: null, embargoUntil: null, labName: 'Lab',
  landingUrl: 'http://localhost/datasets/1?version=1', datasetUrl: 'http://localhost/datasets/1',
  metadata: { title: 'Names', creators, license: 'CC-BY-4.0' }
})

describe('creator names', () => {
  const garcia: Creator = { name: 'García Márquez, Gabriela', nameType: 'Personal', familyName: 'García Márquez', givenName: 'Gabriela' }
  const vanDer: Creator = { name: 'van der Berg, Anke', familyName: 'van der Berg', givenName: 'Anke' }
  const org: Creator = { name: 'Meridian Charge-Transfer Consortium', nameType: 'Organizational' }
  const old: Creator = { name: 'Sunniva Orrel' } // stored before names had parts: not split at a space

  it('keeps compound family names and particles whole, organisations as one name, old unsplit names whole', () => {
    expect(creatorParts(garcia)).toEqual({ kind: 'person', family: 'García Márquez', given: 'Gabriela' })
    expect(creatorParts(vanDer)).toEqual({ kind: 'person', family: 'van der Berg', given: 'Anke' })
    expect(creatorParts(org)).toEqual({ kind: 'organization', name: 'Meridian Charge-Transfer Consortium' })
    expect(creatorParts(old)).toEqual({ kind: 'literal', name: 'Sunniva Orrel' })
    expect(creatorParts({ name: 'Orrel, Sunniva' })).toEqual({ kind: 'person', family: 'Orrel', given: 'Sunniva' })
    expect(creatorName({ name: 'x', familyName: 'van der Berg', givenName: 'Anke' })).toBe('van der Berg, Anke')
  })
  it('CSL-JSON, BibTeX (read back by citation-js), DataCite and CFF agree on each name', () => {
    const v = version([garcia, vanDer, org, old])
    expect(cslJson(v)[0]!.author).toEqual([
      { family: 'García Márquez', given: 'Gabriela' }, { family: 'van der Berg', given: 'Anke' },
      { literal: 'Meridian Charge-Transfer Consortium' }, { literal: 'Sunniva Orrel' }
    ])
    const [item] = new Cite(bibtex(v)).data as any[]
    expect(item.author[0]).toMatchObject({ family: 'García Márquez', given: 'Gabriela' })
    expect(item.author[1].given).toBe('Anke')
    expect(`${item.author[1]['non-dropping-particle'] ?? ''} ${item.author[1].family}`.trim()).toBe('van der Berg')
    // a braced name is one last name to BibTeX: not split into given and family
    expect(item.author[2]).toEqual({ family: 'Meridian Charge-Transfer Consortium' })
    const dc = dataciteJson(v).data.attributes.creators
    expect(dc.map(c => c.nameType)).toEqual(['Personal', 'Personal', 'Organizational', 'Personal'])
    expect(dc[0]).toMatchObject({ name: 'García Márquez, Gabriela', familyName: 'García Márquez', givenName: 'Gabriela' })
    expect(dc[3]).toEqual(expect.not.objectContaining({ familyName: expect.anything() }))
    const authors = cffDoc(v).authors as Record<string, string>[]
    expect(authors[2]).toEqual({ name: 'Meridian Charge-Transfer Consortium' })
    expect(authors[0]).toMatchObject({ 'family-names': 'García Márquez', 'given-names': 'Gabriela' })
  })
})
