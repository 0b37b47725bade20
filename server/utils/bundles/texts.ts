/** The bundle's own texts: its README and the CITATION.cff of the selection. */
import type { CitableVersion } from '../publishing/citation'
import { cff, selectionCff } from '../publishing/citation-formats'
import type { Selection } from './selection'

export function bundleCff (cited: CitableVersion[], sel: Selection): string {
  return cited.length === 1
    ? cff(cited[0]!)
    : selectionCff(cited, `Crosspoint selection: ${sel.description}`, sel.source)
}

export function readme (cited: CitableVersion[], sel: Selection, count: number, header: string[]): string {
  const licences = [...new Set(cited.map(c => c.license))]
  return [
    `# Crosspoint bundle`,
    '',
    `${count} electron-transfer rate records: ${sel.description}.`,
    `Made ${new Date().toISOString()} from ${sel.source}.`,
    '',
    '## What is here',
    '',
    '- `records.csv`: one row per record, canonical units in the header (eV, K, Å, s⁻¹ or M⁻¹ s⁻¹); '
    + 'the value as reported is kept in the *_as_reported columns.',
    '- `records.json`: the same records, in the same order; '
    + 'each `record` is valid against `schemas/rate-record.v1.json` (JSON Schema 2020-12).',
    '- `datasets/*.datacite.json`: citation metadata (DataCite) of every contributing dataset version.',
    '- `CITATION.cff`: how to cite this bundle.',
    '',
    '## Columns',
    '',
    '| column | unit |',
    '|---|---|',
    ...header.map((h) => {
      const m = h.match(/^(.*?) \((.*)\)$/)
      return m ? `| ${m[1]} | ${m[2]} |` : `| ${h} | – |`
    }),
    '',
    '## How to cite',
    '',
    'Cite every dataset you use:',
    '',
    ...cited.map(
      c =>
        `- ${c.metadata.creators.map(a => a.name).join('; ')} (${(c.publishedAt ?? new Date()).getUTCFullYear()}). `
        + `${c.title} (Version ${c.versionNumber}). Crosspoint. `
        + `${c.doi ? `https://doi.org/${c.doi}` : c.landingUrl} — licence ${c.license}`
    ),
    '',
    '## Licences',
    '',
    licences.length > 1
      ? `This selection mixes licences: ${licences.join(', ')}. Each record's licence is in the license column; respect each.`
      : `All records: ${licences[0] ?? 'n/a'}.`,
    '',
    '## Checking the bag',
    '',
    'This is a BagIt 1.0 bag (RFC 8493): `manifest-sha256.txt` lists the sha256 of every payload file, '
    + '`bag-info.txt` gives Payload-Oxum (octets.files) and `tagmanifest-sha256.txt` covers the tag files.',
    '',
    'Model parameters in the records are what authors reported; derived values say how they were obtained. Demo datasets are invented.',
    ''
  ].join('\n')
}
