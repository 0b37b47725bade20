/**
 * Chemical structures through RDKit (the @rdkit/rdkit WebAssembly build, server side): a SMILES as
 * written in a record is read once, and its canonical SMILES, standard InChI/InChIKey, an SVG
 * depiction and its Morgan fingerprint are cached in the `structure` table.
 */
import { createRequire } from 'node:module'
import { inArray } from 'drizzle-orm'
import initRDKitModule from '@rdkit/rdkit'
import { useDb, schema } from '../storage/db'

type RDKit = Awaited<ReturnType<typeof initRDKitModule>>
let rdkit: Promise<RDKit> | undefined

/** The WebAssembly module, started on first use (≈ 0.2 s) and kept for the life of the process. */
export function useRDKit (): Promise<RDKit> {
  if (!rdkit) {
    // The wasm file sits beside the loader in node_modules, in development and in the built server.
    const wasm = createRequire(import.meta.url).resolve('@rdkit/rdkit/RDKit_minimal.wasm')
    rdkit = initRDKitModule({ locateFile: () => wasm })
    rdkit.catch(() => {
      rdkit = undefined
    })
  }
  return rdkit
}

export const MORGAN = { radius: 2, nBits: 2048 }
export const TOOLKIT_LABEL = 'RDKit MinimalLib'

export interface Structure {
  smiles: string
  canonicalSmiles: string | null
  inchi: string | null
  inchiKey: string | null
  svg: string | null
  morganFp: string | null
  error: string | null
}

/** Reads one SMILES with RDKit; a SMILES it cannot parse comes back with `error` set. */
export function computeStructure (rd: RDKit, smiles: string): Structure {
  const failed = (error: string): Structure => ({
    smiles,
    canonicalSmiles: null,
    inchi: null,
    inchiKey: null,
    svg: null,
    morganFp: null,
    error
  })
  if (!smiles.trim() || smiles.length > 2000) return failed('empty or longer than 2000 characters')
  const mol = rd.get_mol(smiles)
  if (!mol) return failed('RDKit could not read this SMILES (check brackets, ring-closure digits and element symbols)')
  try {
    if (!mol.is_valid()) return failed('RDKit could not read this SMILES')
    const inchi = mol.get_inchi() || null
    const bits = mol.get_morgan_fp(JSON.stringify(MORGAN))
    return {
      smiles,
      canonicalSmiles: mol.get_smiles(),
      inchi,
      inchiKey: inchi ? rd.get_inchikey_for_inchi(inchi) || null : null,
      svg: mol.get_svg(260, 190),
      morganFp: bitsToHex(bits),
      error: null
    }
  }
  finally {
    mol.delete()
  }
}

/** '0101…' (bit 0 first) → hex, four bits a digit, bit 0 as the digit's lowest bit. */
export function bitsToHex (bits: string): string {
  let out = ''
  for (let i = 0; i < bits.length; i += 4) {
    let d = 0
    for (let j = 0; j < 4; j++) if (bits[i + j] === '1') d |= 1 << j
    out += d.toString(16)
  }
  return out
}
/** Hex from bitsToHex → 32-bit words for Tanimoto (bit i in word i >> 5 at position i & 31). */
export function hexToWords (hex: string): Uint32Array {
  const words = new Uint32Array(Math.ceil(hex.length / 8))
  for (let i = 0; i < hex.length; i++) words[i >> 3]! |= parseInt(hex[i]!, 16) << ((i & 7) * 4)
  return words
}

const CHUNK = 500

/** Cached structures of these SMILES, computing and storing the ones not seen before. */
export async function structuresFor (smilesList: Iterable<string>): Promise<Map<string, Structure>> {
  const wanted = [...new Set(smilesList)].filter(Boolean)
  const out = new Map<string, Structure>()
  if (!wanted.length) return out
  const db = await useDb()
  for (let i = 0; i < wanted.length; i += CHUNK) {
    const rows = await db
      .select()
      .from(schema.structures)
      .where(inArray(schema.structures.smiles, wanted.slice(i, i + CHUNK)))
    for (const r of rows) out.set(r.smiles, r)
  }
  const missing = wanted.filter(s => !out.has(s))
  if (missing.length) {
    const rd = await useRDKit()
    const fresh = missing.map(s => computeStructure(rd, s))
    for (let i = 0; i < fresh.length; i += CHUNK) {
      await db
        .insert(schema.structures)
        .values(fresh.slice(i, i + CHUNK).map(s => ({ ...s, toolkit: `${TOOLKIT_LABEL} ${rd.version()}` })))
        .onConflictDoNothing()
    }
    for (const s of fresh) out.set(s.smiles, s)
  }
  return out
}

/** Morgan fingerprints (as 32-bit words) of the SMILES that RDKit could read. */
export async function fingerprintsFor (smilesList: Iterable<string>): Promise<Map<string, Uint32Array>> {
  const out = new Map<string, Uint32Array>()
  for (const [s, st] of await structuresFor(smilesList)) if (st.morganFp) out.set(s, hexToWords(st.morganFp))
  return out
}

/**
 * Problems with the SMILES of records about to be written: one per record and field that RDKit
 * cannot read, and one where a given InChIKey disagrees with the structure. `at(i)` says where
 * record i came from (row of a file, or position in a request).
 */
export async function structureIssues (
  records: {
    system: {
      donor: { smiles?: string, inchiKey?: string }
      acceptor: { smiles?: string, inchiKey?: string }
      bridge?: { smiles?: string, inchiKey?: string }
    }
  }[],
  at: (i: number) => { path: string, row?: number }
) {
  const species = ['donor', 'acceptor', 'bridge'] as const
  const all = records.flatMap(r => species.map(k => r.system[k]?.smiles).filter((s): s is string => !!s))
  if (!all.length) return { errors: [], warnings: [] }
  const known = await structuresFor(all)
  /** `index`: which of `records` the problem belongs to. */
  const errors: { index: number, path: string, row?: number, column?: string, message: string }[] = []
  const warnings: typeof errors = []
  records.forEach((r, i) => {
    for (const k of species) {
      const sp = r.system[k]
      if (!sp?.smiles) continue
      const st = known.get(sp.smiles)!
      const where = at(i)
      const loc = {
        index: i,
        path: `${where.path}/system/${k}/smiles`,
        ...(where.row !== undefined ? { row: where.row, column: `${k}_smiles` } : {})
      }
      if (st.error)
        errors.push({
          ...loc,
          message: `${k} SMILES "${sp.smiles.slice(0, 60)}" is not a valid structure: ${st.error}`
        })
      else if (sp.inchiKey && st.inchiKey && sp.inchiKey !== st.inchiKey)
        warnings.push({
          ...loc,
          path: `${where.path}/system/${k}/inchiKey`,
          message: `${k} InChIKey ${sp.inchiKey} does not match the SMILES (RDKit gives ${st.inchiKey})`
        })
    }
  })
  return { errors, warnings }
}
