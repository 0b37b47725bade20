/** The session-signing secret the demo ships with. A production server refuses it unless started as the demo. */
export const DEMO_AUTH_SECRET = 'crosspoint-demo-secret-change-me-in-production'

/** Why the server must not start with this secret, or null when it may. */
export function secretProblem (secret: string, env: NodeJS.ProcessEnv, isDevServer: boolean): string | null {
  if (isDevServer || env.CROSSPOINT_DEMO === '1') return null
  if (!secret || secret === DEMO_AUTH_SECRET)
    return 'NUXT_AUTH_SECRET is not set (or is the demo value, which anyone can read): anyone could forge a session. '
      + 'Set NUXT_AUTH_SECRET to a long random value, or start the demo with npm run demo'
  return null
}
