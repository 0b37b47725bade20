/** Start-up: open and migrate the database; a server that cannot do so stops with a clear message. */
export default defineNitroPlugin(async () => {
  try {
    await useDb()
  } catch (e) {
    console.error(`\n[crosspoint] start-up failed: ${(e as Error).message}\n`)
    process.exit(1)
  }
})
