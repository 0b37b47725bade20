/** Points pasted by a person: one per line, ΔG° (eV), log10 k, then optionally σ(log10 k) (0 = none) and T (K). */
export interface PastedPoint {
  deltaG: number
  log10Rate: number
  log10RateUncertainty?: number
  temperatureK?: number
}

/** The points, and the line numbers (1-based) that are not numbers; lines starting with # are notes. */
export function parsePoints (text: string): { rows: PastedPoint[], bad: number[] } {
  const rows: PastedPoint[] = []
  const bad: number[] = []
  text.split(/\r?\n/).forEach((line, i) => {
    const t = line.trim()
    if (!t || t.startsWith('#')) return
    const parts = t.split(/[\s,;]+/).map(Number)
    if (parts.length < 2 || parts.slice(0, 4).some(v => !Number.isFinite(v))) {
      bad.push(i + 1)
      return
    }
    rows.push({
      deltaG: parts[0]!,
      log10Rate: parts[1]!,
      ...(parts.length > 2 && parts[2]! > 0 ? { log10RateUncertainty: parts[2]! } : {}),
      ...(parts.length > 3 ? { temperatureK: parts[3]! } : {})
    })
  })
  return { rows, bad }
}
