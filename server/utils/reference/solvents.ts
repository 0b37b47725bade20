/** Field rules of the solvent reference table, shared by the add and edit routes. */
export const solventFields = {
  name: { type: 'string', minLength: 1, maxLength: 120 },
  permittivity: { type: 'number', exclusiveMinimum: 1, maximum: 200 },
  refractiveIndex: { type: 'number', minimum: 1, maximum: 3 },
  viscosity: { type: ['number', 'null'], exclusiveMinimum: 0, maximum: 10000 },
  temperatureK: { type: 'number', exclusiveMinimum: 0, maximum: 1000 },
  source: { type: 'string', minLength: 3, maxLength: 300 }
}
