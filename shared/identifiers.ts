/** Identifier syntax checks: ORCID iD (ISO 7064 MOD 11-2), DOI (DOI Handbook syntax). */

/** ISO 7064 MOD 11-2 check character over a string of digits. */
export function mod112CheckChar (digits: string): string {
  let total = 0
  for (const ch of digits) total = (total + Number(ch)) * 2
  const result = (12 - (total % 11)) % 11
  return result === 10 ? 'X' : String(result)
}

/** Accepts 0000-0002-1825-0097 or https://orcid.org/0000-0002-1825-0097; null when malformed. */
export function normalizeOrcid (input: string): string | null {
  const s = input.trim().replace(/^https?:\/\/orcid\.org\//i, '')
  return /^\d{4}-\d{4}-\d{4}-\d{3}[\dX]$/.test(s) ? s : null
}

/** A well-formed ORCID iD whose last character is the MOD 11-2 check over the first 15 digits. */
export function isValidOrcid (input: string): boolean {
  const s = normalizeOrcid(input)
  if (!s) return false
  const digits = s.replace(/-/g, '')
  return mod112CheckChar(digits.slice(0, 15)) === digits[15]
}

/** Builds an ORCID-shaped iD with a correct check character from 15 digits (demo data only). */
export function orcidFromDigits (fifteen: string): string {
  const d = fifteen + mod112CheckChar(fifteen)
  return `${d.slice(0, 4)}-${d.slice(4, 8)}-${d.slice(8, 12)}-${d.slice(12, 16)}`
}

/** DOI syntax: "10." + registrant code (dot-separated digits) + "/" + a non-empty suffix. */
export function isValidDoi (input: string): boolean {
  const s = input
    .trim()
    .replace(/^https?:\/\/(dx\.)?doi\.org\//i, '')
    .replace(/^doi:/i, '')
  return /^10\.\d{4,9}(\.\d+)*\/\S+$/.test(s)
}

export function normalizeDoi (input: string): string {
  return input
    .trim()
    .replace(/^https?:\/\/(dx\.)?doi\.org\//i, '')
    .replace(/^doi:/i, '')
}
