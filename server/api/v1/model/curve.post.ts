import { computeCurve, curveBodySchema, type CurveBody } from '../../../utils/model/route-schemas'
import { readValidated } from '../../../utils/http/validation'

defineRouteMeta({
  openAPI: {
    tags: ['model'],
    summary: 'Classical or semi-classical rate curve',
    description:
      'log10 k (and k) for up to 100 000 driving forces (eV). Energies in eV, temperature in K, every input within its '
      + 'physical bounds (see the request schema); 422 with a JSON pointer and a sentence per bad field. rate is 0 '
      + 'where k is below the smallest double and null above the largest (notes says so); log10Rate is always exact.',
    requestBody: { required: true, content: { 'application/json': { schema: { type: 'object' } } } },
    responses: {
      200: { description: '{ points: [{ deltaG, rate, log10Rate }], termsUsed }' },
      422: { description: 'Invalid input' }
    }
  }
})

export default defineEventHandler(async (event) => {
  const body = await readValidated<CurveBody>(event, curveBodySchema)
  return computeCurve(body)
})
