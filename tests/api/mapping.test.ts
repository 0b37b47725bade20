/**
 * Spreadsheets as labs write them, read through the mapping step: each file is inspected (the proposed mapping is
 * checked field by field), the fields the file leaves out are set once for the whole file as a person would, the
 * file is checked and committed with that mapping, and every record is compared value by value (in the format's
 * canonical units). Problems are named by the file's own row and header; a saved mapping is proposed again for
 * the next file with the same headers.
 */
import ExcelJS from 'exceljs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { api, DEMO, signIn, startServer, type TestServer } from '../helpers/server'

let s: TestServer
let cookie = ''
let id = 0
let labId = 0
const SET_ONCE = { linkage: { value: 'covalent' }, process: { value: 'charge-separation' }, initial_state: { value: 'singlet' }, technique: { value: 'transient-absorption' }, solvent: { value: 'toluene' } }

async function send (route: 'inspect' | 'check', name: string, body: string | Uint8Array, fields: Record<string, string> = {}) {
  const form = new FormData()
  form.append('file', new Blob([body]), name)
  for (const [k, v] of Object.entries(fields)) form.append(k, v)
  const r = await fetch(`${s.url}/api/v1/datasets/${id}/uploads/${route}`, { method: 'POST', body: form, headers: { cookie } })
  return { status: r.status, data: await r.json() as any }
}
/** Inspect, add what the file does not say, check with the mapping, commit; the records added (newest last). */
async function deposit (name: string, body: string | Uint8Array, adjust: (m: any) => void = () => {}, fields: Record<string, string> = {}) {
  const seen = await send('inspect', name, body, fields)
  expect(seen.status, JSON.stringify(seen.data).slice(0, 300)).toBe(200)
  const mapping = seen.data.mapping
  mapping.constants = { ...SET_ONCE, ...mapping.constants }
  adjust(mapping)
  const before = (await api(s.url, `/api/v1/datasets/${id}/versions/1?pageSize=1000`, { headers: { cookie } })).data.records.length
  const checked = await send('check', name, body, { mapping: JSON.stringify(mapping) })
  expect(checked.status, JSON.stringify(checked.data).slice(0, 500)).toBe(200)
  expect(checked.data.issues, JSON.stringify(checked.data.issues)).toEqual([])
  const c = await api(s.url, `/api/v1/datasets/${id}/uploads/${checked.data.upload.id}/commit`, { method: 'POST', headers: { cookie }, json: { mode: 'append' } })
  expect(c.status).toBe(200)
  const all = (await api(s.url, `/api/v1/datasets/${id}/versions/1?pageSize=1000`, { headers: { cookie } })).data.records
  return { proposed: seen.data, records: all.slice(before).map((r: any) => r.data) }
}
const close = (a: number, b: number) => expect(Math.abs(a / b - 1)).toBeLessThan(1e-9)

beforeAll(async () => {
  s = await startServer({ seed: true })
  cookie = await signIn(s.url, DEMO.contributorA)
  labId = (await api(s.url, '/api/v1/me', { headers: { cookie } })).data.user.labIds[0]
  id = (await api(s.url, '/api/v1/datasets', { method: 'POST', headers: { cookie }, json: { labId, title: 'Spreadsheets as labs write them' } })).data.id
}, 90_000)
afterAll(async () => { await s?.stop() })

describe('files written as labs write them', () => {
  it('1. own headers with units after a slash (T / K, k_ET / s^-1, dG / eV)', async () => {
    const { proposed, records } = await deposit('slash.csv', 'Donor,Acceptor,Solvent,T / K,k_ET / s^-1,dG / eV\nZnP,C60,toluene,298,1.2e9,-0.74\nH2P,C70,benzonitrile,295.5,3.4e8,-0.52\n')
    expect(proposed.mapping.columns).toEqual([
      { field: 'donor_name' }, { field: 'acceptor_name' }, { field: 'solvent' }, { field: 'temperature', unit: 'K' },
      { field: 'rate', unit: 's-1' }, { field: 'delta_g', unit: 'eV' }
    ])
    expect(records.map((r: any) => [r.system.donor.name, r.system.acceptor.name, r.medium.solvent, r.temperatureK, r.rate.value, r.drivingForce.value]))
      .toEqual([['ZnP', 'C60', 'toluene', 298, 1.2e9, -0.74], ['H2P', 'C70', 'benzonitrile', 295.5, 3.4e8, -0.52]])
  })
  it('2. units in parentheses and brackets; a rate in ns⁻¹ becomes s⁻¹', async () => {
    const { proposed, records } = await deposit('paren.csv', 'donor name,acceptor name,T (K),k (ns-1),ΔG° (eV)\nZnP,NDI,298.15,2.5,-0.61\n')
    expect(proposed.mapping.columns.map((c: any) => [c.field, c.unit])).toEqual([['donor_name', undefined], ['acceptor_name', undefined], ['temperature', 'K'], ['rate', 'ns-1'], ['delta_g', 'eV']])
    close(records[0].rate.value, 2.5e9)
    expect(records[0].drivingForce.value).toBe(-0.61)
  })
  it('3. semicolons and decimal commas (298,15;1,2e9;-0,74)', async () => {
    const { proposed, records } = await deposit('comma.csv', 'Donor;Acceptor;T (K);k (s-1);dG (eV)\nZnP;C60;298,15;1,2e9;-0,74\nZnP;C70;77;3,5e8;-0,9\n')
    expect(proposed.mapping.decimal).toBe(',')
    expect(records.map((r: any) => [r.temperatureK, r.rate.value, r.drivingForce.value])).toEqual([[298.15, 1.2e9, -0.74], [77, 3.5e8, -0.9]])
  })
  it('4. a title block above the table, the solvent and temperature written once in it', async () => {
    const { proposed, records } = await deposit('title.csv', 'Flash photolysis run 14\nSolvent: acetonitrile\nT = 293 K\n\nDonor,Acceptor,k (s-1)\nPTZ,DCA,4.1e9\nPTZ,TCNB,8.0e8\n')
    expect(proposed.mapping).toMatchObject({ headerRow: 5, firstDataRow: 6, constants: { solvent: { value: 'acetonitrile' }, temperature: { value: '293', unit: 'K' } } })
    expect(records.map((r: any) => [r.medium.solvent, r.temperatureK, r.rate.value])).toEqual([['acetonitrile', 293, 4.1e9], ['acetonitrile', 293, 8e8]])
  })
  it('5. units in a second header row', async () => {
    const { proposed, records } = await deposit('units-row.csv', 'Donor,Acceptor,T,k,dG\n,,K,ps-1,meV\nZnP,C60,300,0.5,-740\n')
    expect(proposed.mapping).toMatchObject({ headerRow: 1, unitsRow: 2, firstDataRow: 3 })
    expect(proposed.mapping.columns.map((c: any) => c.unit)).toEqual([undefined, undefined, 'K', 'ps-1', 'meV'])
    close(records[0].rate.value, 5e11)
    close(records[0].drivingForce.value, -0.74)
  })
  it('6. two sheets: the rates are on the second', async () => {
    const wb = new ExcelJS.Workbook()
    wb.addWorksheet('notes').addRows([['Measured 2026-03'], ['see lab book 7']])
    wb.addWorksheet('rates').addRows([['Donor', 'Acceptor', 'T (K)', 'k (s-1)'], ['Ru(bpy)3', 'MV2+', 298, 2.1e9]])
    const buf = new Uint8Array(await wb.xlsx.writeBuffer())
    const first = await send('inspect', 'two-sheets.xlsx', buf)
    expect(first.data).toMatchObject({ sheets: ['notes', 'rates'], sheet: 'notes' })
    const { proposed, records } = await deposit('two-sheets.xlsx', buf, () => {}, { sheet: 'rates' })
    expect(proposed.mapping.sheet).toBe('rates')
    expect(proposed.mapping.columns.map((c: any) => c.field)).toEqual(['donor_name', 'acceptor_name', 'temperature', 'rate'])
    expect([records[0].system.donor.name, records[0].rate.value]).toEqual(['Ru(bpy)3', 2.1e9])
  })
  it('7. a constant column: the same technique and solvent set once for the file', async () => {
    const { records } = await deposit('constant.csv', 'Donor,Acceptor,T (K),k (s-1)\nZnP,C60,298,1e9\nZnP,C70,298,2e9\n', (m) => {
      m.constants.solvent = { value: 'toluene' }
      m.constants.technique = { value: 'steady-state-quenching' }
    })
    expect(records.map((r: any) => [r.medium.solvent, r.technique.method])).toEqual([['toluene', 'steady-state-quenching'], ['toluene', 'steady-state-quenching']])
  })
  it('8. lifetimes in ps with references in ns: k = 1/τ − 1/τ₀', async () => {
    const { proposed, records } = await deposit('lifetimes.csv', 'Donor,Acceptor,T (K),tau (ps),tau0 (ns)\nZnP,C60,298,250,2.0\n')
    expect(proposed.mapping.columns.slice(3)).toEqual([{ field: 'lifetime', unit: 'ps' }, { field: 'reference_lifetime', unit: 'ns' }])
    close(records[0].rate.value, 1 / 250e-12 - 1 / 2e-9)
    expect(records[0].rate.method).toBe('lifetimes')
  })
  it('9. potentials against different electrodes, with the stated offset', async () => {
    const body = 'Donor,Acceptor,T (K),k (s-1),E_ox vs SCE / V,E_red vs Fc+/Fc / V,offset (V),E00 (eV),solvent,permittivity,refractive index\n'
      + 'PTZ,DCA,298,4e9,0.72,-1.31,0.38,2.9,acetonitrile,35.9,1.344\n'
    const { proposed, records } = await deposit('electrodes.csv', body, (m) => { m.constants.delta_g_method = { value: 'redox-potentials' } })
    expect(proposed.mapping.constants).toMatchObject({ donor_reference: { value: 'SCE' }, acceptor_reference: { value: 'Fc+/Fc' } })
    const redox = records[0].drivingForce.redox
    expect([redox.donorOxidationPotential, redox.donorReference, redox.acceptorReductionPotential, redox.acceptorReference, redox.referenceOffset])
      .toEqual([0.72, 'SCE', -1.31, 'Fc+/Fc', 0.38])
  })
  it('10. thousands separators and a minus sign as typeset (−0.74)', async () => {
    const { proposed, records } = await deposit('thousands.csv', 'Donor,Acceptor,T (K),k (s-1),dG (eV)\nZnP,C60,298,"1,200,000,000",−0.74\n')
    expect(proposed.mapping).toMatchObject({ decimal: '.', thousands: ',' })
    expect([records[0].rate.value, records[0].drivingForce.value]).toEqual([1.2e9, -0.74])
  })
})

describe('problems by the file\'s own names; nothing written; saved mappings', () => {
  it('a bad cell is named by the file\'s row and header, and nothing is added', async () => {
    const before = (await api(s.url, `/api/v1/datasets/${id}/versions/1?pageSize=1000`, { headers: { cookie } })).data.records.length
    const body = 'Run 3\nSolvent: toluene\nDonor;Acceptor;T (K);k (s-1)\nZnP;C60;298;1,0e9\nZnP;C70;warm;2,0e9\n'
    const seen = await send('inspect', 'bad.csv', body)
    const m = { ...seen.data.mapping, constants: { ...SET_ONCE, ...seen.data.mapping.constants } }
    const r = await send('check', 'bad.csv', body, { mapping: JSON.stringify(m) })
    expect(r.data.issues).toEqual([expect.objectContaining({ row: 5, column: 'T (K)' })])
    expect(r.data.upload).toBeNull()
    expect((await api(s.url, `/api/v1/datasets/${id}/versions/1?pageSize=1000`, { headers: { cookie } })).data.records.length).toBe(before)
    // a mapping naming a field the format lacks, by its column
    const wrong = { ...m, columns: [{ field: 'donor_name' }, { field: 'colour' }] }
    const w = await send('check', 'bad.csv', body, { mapping: JSON.stringify(wrong) })
    expect(w.status).toBe(422)
    expect(w.data.data.issues[0]).toMatchObject({ path: '/mapping/columns/1/field', column: 'Acceptor' })
  })
  it('without a mapping an unknown header is refused with the proposal beside the problems', async () => {
    const r = await send('check', 'own.csv', 'Donor,Acceptor,T / K,k_ET / s^-1\nZnP,C60,298,1e9\n')
    expect(r.status).toBe(422)
    expect(r.data.message).toMatch(/Unknown columns: Donor, Acceptor, T \/ K, k_ET \/ s\^-1/)
    expect(r.data.data.proposal.columns.map((c: any) => c.field)).toEqual(['donor_name', 'acceptor_name', 'temperature', 'rate'])
  })
  it('a header word a curator declares is proposed from then on', async () => {
    const body = 'Sensitiser,Quencher,T (K),k (s-1)\nRu(bpy)3,MV2+,298,2e9\n'
    expect((await send('inspect', 'words.csv', body)).data.mapping.columns.map((c: any) => c.field)).toEqual([null, null, 'temperature', 'rate'])
    const curator = await signIn(s.url, DEMO.curator)
    for (const [alias, field] of [['Sensitiser', 'donor_name'], ['quencher', 'acceptor_name']]) {
      const r = await api(s.url, '/api/v1/header-synonyms', { method: 'POST', headers: { cookie: curator }, json: { alias, field } })
      expect(r.status).toBe(201)
    }
    expect((await api(s.url, '/api/v1/header-synonyms', { method: 'POST', headers: { cookie: curator }, json: { alias: 'T', field: 'notes' } })).status).toBe(409)
    expect((await api(s.url, '/api/v1/header-synonyms', { method: 'POST', headers: { cookie: curator }, json: { alias: 'shade', field: 'colour' } })).data.data.issues[0].path).toBe('/field')
    expect((await send('inspect', 'words.csv', body)).data.mapping.columns.map((c: any) => c.field)).toEqual(['donor_name', 'acceptor_name', 'temperature', 'rate'])
  })
  it('columns whose headers say nothing are proposed from their values (allowed words, known solvents)', async () => {
    const body = 'Donor,Acceptor,Col C,Col D,Col E,T (K),k (s-1)\nZnP,C60,charge-separation,toluene,covalent,298,1e9\nZnP,C70,charge-recombination,benzonitrile,covalent,298,2e9\n'
    const r = await send('inspect', 'values.csv', body)
    expect(r.data.mapping.columns.map((c: any) => c.field)).toEqual(['donor_name', 'acceptor_name', 'process', 'solvent', 'linkage', 'temperature', 'rate'])
  })
  it('a saved mapping is proposed again for the next file with the same headers', async () => {
    const body = 'Donor,Acceptor,T / K,k_ET / s^-1\nZnP,C60,298,1e9\n'
    const first = await send('inspect', 'a.csv', body)
    expect(first.data.source).toBe('proposed')
    const mapping = { ...first.data.mapping, constants: SET_ONCE }
    const saved = await api(s.url, `/api/v1/labs/${labId}/mappings`, { method: 'POST', headers: { cookie }, json: { name: 'Flash photolysis export', headers: first.data.rows[0], mapping } })
    expect(saved.status).toBe(201)
    const next = await send('inspect', 'b.csv', 'Donor,Acceptor,T / K,k_ET / s^-1\nH2P,C70,300,2e9\n')
    expect(next.data).toMatchObject({ source: 'saved', saved: { name: 'Flash photolysis export' } })
    expect(next.data.mapping.constants).toEqual(SET_ONCE)
    expect(next.data.preview.rows[0]).toEqual(['H2P', 'C70', 300, 2e9, 'covalent', 'charge-separation', 'singlet', 'transient-absorption', 'toluene'])
    // another lab's members do not see it
    const other = await signIn(s.url, DEMO.contributorB)
    expect((await api(s.url, `/api/v1/labs/${labId}/mappings`, { headers: { cookie: other } })).status).toBe(404)
  })
})
