import { intParam } from '../../../../utils/http/params'
import { requireCurator, startDerivationCorrection } from '../../../../utils/review'

defineRouteMeta({
  openAPI: {
    tags: ['review'],
    summary:
      'Start a correction version of a published dataset with every ΔG° from potentials re-derived by process '
      + '(curators, not of the dataset\'s lab)',
    description:
      'Creates the next version as a draft of the dataset\'s lab, mails the lab, and leaves the published version '
      + 'unchanged. 409 when nothing differs or the newest version is not published. → { versionNumber, state, '
      + 'rederived }',
    responses: {
      201: { description: 'The draft version' },
      403: { description: 'Not a curator, or the curator\'s own lab' },
      404: { description: 'No such dataset' },
      409: { description: 'Nothing to correct' }
    }
  }
})

export default defineEventHandler(async (event) => {
  const v = await requireCurator(event)
  const id = intParam(event, 'id')
  const r = await startDerivationCorrection(v, id)
  setResponseStatus(event, 201)
  return r
})
