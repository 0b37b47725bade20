import { archiveOverview } from '../../utils/publishing/archive'

defineRouteMeta({
  openAPI: {
    tags: ['archive'],
    summary: 'The archive at a glance: counts, latest publications, (ΔG°, log10 k) of every published record'
  }
})

export default defineEventHandler(() => archiveOverview())
