/**
 * What search engines and link previews read about a page: its own description, a canonical link (the landing page
 * without version or paging parameters), Open Graph tags, and for a page whose subject does not exist (or is hidden
 * from this visitor) a real 404 status with noindex, so that "not found" is never indexed as a page.
 */
import type { MaybeRefOrGetter } from 'vue'

export interface PageMeta {
  title: string
  description: string
  /** site-relative path of the canonical page, e.g. /datasets/4 */
  path?: string
  /** the subject was not found: answer 404 (on the server) and ask not to be indexed */
  notFound?: boolean
  type?: 'website' | 'article'
}

export function usePageMeta (meta: MaybeRefOrGetter<PageMeta>) {
  const base = useRuntimeConfig().public.baseUrl.replace(/\/$/, '')
  const m = computed(() => toValue(meta))
  const url = computed(() => (m.value.path ? base + m.value.path : undefined))
  if (import.meta.server && m.value.notFound) {
    const event = useRequestEvent()
    if (event) setResponseStatus(event, 404)
  }
  useHead(() => ({
    title: m.value.title,
    link: url.value && !m.value.notFound ? [{ rel: 'canonical', href: url.value }] : [],
    meta: m.value.notFound ? [{ name: 'robots', content: 'noindex' }] : []
  }))
  useSeoMeta({
    description: () => m.value.description,
    ogTitle: () => m.value.title,
    ogDescription: () => m.value.description,
    ogType: () => m.value.type ?? 'website',
    ogSiteName: 'Crosspoint',
    ogUrl: () => (m.value.notFound ? undefined : url.value)
  })
}
