import { requireCurator } from '../../../utils/review'
import { derivationReport } from '../../../utils/review/derivations'
import { useDb } from '../../../utils/storage/db'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary:
      'Published datasets whose stored ΔG° (derived from redox potentials) differs from the derivation for the '
      + 'record\'s process (curators, admins)',
    description:
      'Charge separation: Rehm–Weller with the ion-pair term; charge recombination: −(ΔG°_CS + E₀₀); charge shift and '
      + 'hole transfer: no ion-pair term. Published versions never change: start a correction version from here. → '
      + '{ items: [{ datasetId, title, labName, versionNumber, doi, differing, examples: [{ recordId, position, '
      + 'process, stored, derived }] }] }',
    responses: {
      200: { description: 'The report' },
      401: { description: 'Not signed in' },
      403: { description: 'Not a curator' }
    }
  }
})

export default defineEventHandler(async (event) => {
  await requireCurator(event)
  return { items: await derivationReport(await useDb()) }
})
