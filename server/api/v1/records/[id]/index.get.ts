import { getViewer } from '../../../../utils/accounts/auth'
import { getRecord } from '../../../../utils/publishing/archive'
import { intParam } from '../../../../utils/http/params'
import { structuresFor } from '../../../../utils/search/structures'
import { systemOfRecord } from '../../../../utils/systems/systems'
import { countUsage } from '../../../../utils/usage/counter'
import { provenanceOf } from '../../../../utils/traces/traces'

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'One record in the open format, with its dataset, provenance and the structures of its species (canonical '
      + 'SMILES, InChI, InChIKey, SVG depiction by RDKit) where it gives SMILES, and the system it measures when '
      + 'other records measured the same one'
  }
})

export default defineEventHandler(async (event) => {
  const id = intParam(event, 'id')
  const { record, version, dataset, labName } = await getRecord(await getViewer(event), id)
  const data = record.data
  const species = (['donor', 'acceptor', 'bridge'] as const).filter(k => data.system[k]?.smiles)
  const known = await structuresFor(species.map(k => data.system[k]!.smiles!))
  const structures = Object.fromEntries(
    species.map((k) => {
      const s = known.get(data.system[k]!.smiles!)!
      return [
        k,
        {
          smiles: s.smiles,
          canonicalSmiles: s.canonicalSmiles,
          inchi: s.inchi,
          inchiKey: s.inchiKey,
          error: s.error,
          depiction: s.svg ? `data:image/svg+xml;base64,${Buffer.from(s.svg).toString('base64')}` : null
        }
      ]
    })
  )
  if (version.state === 'published') countUsage(event, dataset.id, 'investigation', `record:${record.id}`)
  const sys = version.state === 'published' ? await systemOfRecord(record.id) : undefined
  const mine = sys?.records.find(r => r.id === record.id)
  const [fitted] = await provenanceOf(dataset.id, [record])
  return {
    id: record.id,
    position: record.position,
    data: record.data,
    deltaG: record.deltaG,
    log10Rate: record.log10Rate,
    rate: record.rate,
    rateKind: record.rateKind,
    structures,
    dataset: {
      id: dataset.id,
      title: version.title,
      versionNumber: version.versionNumber,
      state: version.state,
      doi: version.doi,
      license: version.license,
      labName,
      isDemo: dataset.isDemo
    },
    // the system this record measures, when other published records measured it too
    system: sys
      ? {
          key: sys.key, labCount: sys.labCount, recordCount: sys.recordCount, consensus: sys.consensus,
          z: mine?.z ?? null, discrepant: mine?.discrepant ?? false
        }
      : null,
    // a rate fitted from an attached trace: the traces (ids to read their points) and the check of the stated rate
    provenance: fitted ?? null
  }
})
