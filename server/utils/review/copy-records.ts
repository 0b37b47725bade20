/** A version's records copied into another version (a new draft from the published one). */
import { sql } from 'drizzle-orm'
import type { Tx } from '../storage/db'

// every derived column comes along (a missing one would have to be made again from the JSON)
const COLUMNS = sql.raw(`position, record_key, data, donor_name, acceptor_name, bridge_name, linkage, process, solvent,
  technique, temperature_k, distance_angstrom, rate, rate_kind, log10_rate, delta_g, is_demo, csv_line, csv_format,
  donor_class, acceptor_class, donor_smiles, acceptor_smiles, notes, solvent_polarity`)

export async function copyRecords (tx: Pick<Tx, 'run'>, fromVersionId: number, toVersionId: number): Promise<void> {
  await tx.run(sql`insert into rate_record (version_id, ${COLUMNS})
    select ${toVersionId}, ${COLUMNS} from rate_record where version_id = ${fromVersionId}`)
}
