/** The columns that say what was measured: donor, acceptor, bridge, process, medium, temperature, geometry. */
import { DISTANCE_UNITS, TEMPERATURE_UNITS } from '../physics/units'
import { LINKAGES, PROCESSES } from './types'
import type { ColumnDef } from './column-def'

export const SYSTEM_COLUMNS: ColumnDef[] = [
  {
    key: 'donor_name',
    kind: 'text',
    required: true,
    pointer: '/system/donor/name',
    help: 'Electron donor',
    example: 'ZnP'
  },
  {
    key: 'donor_class',
    kind: 'text',
    pointer: '/system/donor/class',
    help: 'Chemical class of the donor',
    example: 'porphyrin'
  },
  { key: 'donor_smiles', kind: 'text', pointer: '/system/donor/smiles', help: 'SMILES of the donor', example: '' },
  {
    key: 'acceptor_name',
    kind: 'text',
    required: true,
    pointer: '/system/acceptor/name',
    help: 'Electron acceptor',
    example: 'C60'
  },
  {
    key: 'acceptor_class',
    kind: 'text',
    pointer: '/system/acceptor/class',
    help: 'Chemical class of the acceptor',
    example: 'fullerene'
  },
  {
    key: 'acceptor_smiles',
    kind: 'text',
    pointer: '/system/acceptor/smiles',
    help: 'SMILES of the acceptor',
    example: ''
  },
  {
    key: 'bridge_name',
    kind: 'text',
    pointer: '/system/bridge/name',
    help: 'Bridge or spacer, if any',
    example: 'phenylene'
  },
  {
    key: 'linkage',
    kind: 'enum',
    values: LINKAGES,
    required: true,
    pointer: '/system/linkage',
    help: 'How donor and acceptor are held together',
    example: 'covalent'
  },
  {
    key: 'process',
    kind: 'enum',
    values: PROCESSES,
    required: true,
    pointer: '/process',
    help: 'Kind of electron-transfer step',
    example: 'charge-separation'
  },
  {
    key: 'initial_state',
    kind: 'enum',
    values: ['singlet', 'triplet', 'thermal'],
    required: true,
    pointer: '/initialState',
    help: 'State the reaction starts from',
    example: 'singlet'
  },
  {
    key: 'solvent',
    kind: 'text',
    pointer: '/medium/solvent',
    help: 'Solvent (name from the reference table fills ε and n)',
    example: 'benzonitrile'
  },
  {
    key: 'permittivity',
    kind: 'number',
    pointer: '/medium/permittivity',
    help: 'Static permittivity ε_s (dimensionless); from the solvent table when empty',
    example: ''
  },
  {
    key: 'refractive_index',
    kind: 'number',
    pointer: '/medium/refractiveIndex',
    help: 'Refractive index n_D; from the solvent table when empty',
    example: ''
  },
  {
    key: 'matrix',
    kind: 'text',
    pointer: '/medium/matrix',
    help: 'Solid matrix or film instead of a solvent',
    example: ''
  },
  {
    key: 'temperature',
    kind: 'number',
    units: TEMPERATURE_UNITS,
    required: true,
    pointer: '/temperatureK',
    help: 'Temperature',
    example: '298.15'
  },
  {
    key: 'distance_cc',
    kind: 'number',
    units: DISTANCE_UNITS,
    pointer: '/geometry/centerToCenterAngstrom',
    help: 'Centre-to-centre distance',
    example: '12.5'
  },
  {
    key: 'distance_ee',
    kind: 'number',
    units: DISTANCE_UNITS,
    pointer: '/geometry/edgeToEdgeAngstrom',
    help: 'Edge-to-edge distance',
    example: ''
  }
]
