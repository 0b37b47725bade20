import { getViewer } from '../../../../utils/accounts/auth'
import { getRecord } from '../../../../utils/publishing/archive'
import { intParam } from '../../../../utils/http/params'
import { structuresFor } from '../../../../utils/search/structures'

defineRouteMeta({
  openAPI: {
    tags: ['records'],
    summary:
      'One record in the open format, with its dataset, provenance and the structures of its species (canonical '
      + 'SMILES, InChI, InChIKey, SVG depiction by RDKit) where it gives SMILES'
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
    }
  }
})
