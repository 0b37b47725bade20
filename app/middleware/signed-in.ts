/** Pages that need a session send visitors to sign in first, then back. */
export default defineNuxtRouteMiddleware((to) => {
  const { status } = useAuth()
  if (status.value !== 'authenticated') return navigateTo(`/signin?next=${encodeURIComponent(to.fullPath)}`)
})
