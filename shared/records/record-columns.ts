/** The rate_record table's columns derived from a record (and its stored CSV line), for every path that writes records. */
import { CSV_FORMAT, recordCsvLine } from './csv'
import type { RateRecordV1 } from './types'

export function recordColumns (r: RateRecordV1) {
  return {
    csvLine: recordCsvLine(r),
    csvFormat: CSV_FORMAT,
    donorName: r.system.donor.name,
    acceptorName: r.system.acceptor.name,
    bridgeName: r.system.bridge?.name ?? null,
    linkage: r.system.linkage,
    process: r.process,
    solvent: r.medium.solvent ?? r.medium.matrix ?? null,
    technique: r.technique.method,
    temperatureK: r.temperatureK,
    distanceAngstrom: r.geometry?.centerToCenterAngstrom ?? r.geometry?.edgeToEdgeAngstrom ?? null,
    rate: r.rate.value,
    rateKind: r.rate.kind,
    log10Rate: Math.log10(r.rate.value),
    deltaG: r.drivingForce?.value ?? null,
    donorClass: r.system.donor.class ?? null,
    acceptorClass: r.system.acceptor.class ?? null,
    donorSmiles: r.system.donor.smiles ?? null,
    acceptorSmiles: r.system.acceptor.smiles ?? null,
    notes: r.notes ?? null,
    solventPolarity: solventPolarity(r)
  }
}

/** 1/n² − 1/ε_s (Pekar factor) when the record gives refractive index and permittivity, else null. */
export function solventPolarity (r: RateRecordV1): number | null {
  const { permittivity: eps, refractiveIndex: n } = r.medium
  return eps && n ? 1 / (n * n) - 1 / eps : null
}
