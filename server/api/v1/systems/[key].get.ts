import { httpError } from '../../../utils/http/errors'
import { systemByKey } from '../../../utils/systems/systems'

defineRouteMeta({
  openAPI: {
    tags: ['systems'],
    summary: 'One system: its consensus and every published record of it, with each record\'s σ, z and flag'
  }
})

export default defineEventHandler(async (event) => {
  const key = getRouterParam(event, 'key') ?? ''
  if (!/^[0-9a-f]{16}$/.test(key)) throw httpError(404, 'No such system', [{ path: '/key', message: 'is not a system key' }])
  const s = await systemByKey(key)
  if (!s) throw httpError(404, 'No such system (the records may have changed since the key was made)')
  const { identity: _i, ...system } = s
  return {
    ...system,
    records: system.records.map(r => ({
      id: r.id,
      labName: r.labName,
      datasetId: r.datasetId,
      doi: r.doi,
      temperatureK: r.temperatureK,
      log10Rate: r.log10Rate,
      log10RateSigma: r.sigmaUsed,
      sigmaImputed: r.sigmaImputed,
      z: r.z,
      discrepant: r.discrepant
    }))
  }
})
