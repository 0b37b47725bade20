/** Start-up: refuse the demo session secret in production, open and migrate the database; a server that cannot stops with a clear message. */
import { secretProblem } from '../utils/demo-secret'

export default defineNitroPlugin(async () => {
  const problem = secretProblem(useRuntimeConfig().authSecret, process.env, import.meta.dev)
  if (problem) {
    console.error(`\n[crosspoint] start-up refused: ${problem}\n`)
    process.exit(1)
  }
  try {
    await useDb()
  } catch (e) {
    console.error(`\n[crosspoint] start-up failed: ${(e as Error).message}\n`)
    process.exit(1)
  }
})
