/**
 * Nitro's file tracer copies the files a package's "import"/"default" exports name, but Node 20.19+
 * also honours the "module-sync" condition when a CommonJS file requires an ESM-capable package
 * (several small polyfill packages pulled in by exceljs use it). This copies any such entry file
 * the tracer left out, so the built server starts.
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync, readdirSync } from 'node:fs'
import { dirname, join } from 'node:path'

function targets (exp: unknown, out: string[]): void {
  if (!exp || typeof exp !== 'object') return
  if (Array.isArray(exp)) { exp.forEach(e => targets(e, out)); return }
  for (const [k, v] of Object.entries(exp as Record<string, unknown>)) {
    if (k === 'module-sync' && typeof v === 'string') out.push(v)
    else targets(v, out)
  }
}

export function copyModuleSyncEntries (sourceModules: string, outputModules: string): string[] {
  const copied: string[] = []
  if (!existsSync(outputModules)) return copied
  const pkgs: string[] = []
  for (const d of readdirSync(outputModules)) {
    if (d.startsWith('@')) for (const s of readdirSync(join(outputModules, d))) pkgs.push(`${d}/${s}`)
    else pkgs.push(d)
  }
  for (const p of pkgs) {
    const pj = join(outputModules, p, 'package.json')
    if (!existsSync(pj)) continue
    const list: string[] = []
    targets(JSON.parse(readFileSync(pj, 'utf8')).exports, list)
    for (const t of list) {
      const dest = join(outputModules, p, t)
      const src = join(sourceModules, p, t)
      if (!existsSync(dest) && existsSync(src)) { mkdirSync(dirname(dest), { recursive: true }); copyFileSync(src, dest); copied.push(`${p}/${t}`) }
    }
  }
  return copied
}
