/**
 * The compare selection, shared across pages (search, dataset pages, the compare view). Archive
 * record ids, grouping and model parameters are mirrored in the URL of the compare view so a link
 * reproduces it; the researcher's own points stay in this browser (localStorage), never uploaded.
 */
import { defineStore } from 'pinia'
import {
  MODEL_BOUNDS, MAX_HUANG_RHYS, isEnergyUnit, type EnergyUnit, type SemiclassicalParams
} from '#shared/physics'

type ModelParams = SemiclassicalParams

export interface OwnPoint {
  deltaG: number
  log10Rate: number
  err?: number
  label: string
}
export type GroupBy = 'dataset' | 'solvent' | 'process' | 'temperature'
export const DEFAULT_PARAMS: ModelParams = {
  lambdaSolvent: 0.7,
  lambdaInternal: 0.3,
  vibrationEnergy: 0.18,
  coupling: 0.004,
  temperatureK: 298.15
}

export const useCompareStore = defineStore('compare', () => {
  const recordIds = ref<number[]>([])
  const ownPoints = ref<OwnPoint[]>([])
  const groupBy = ref<GroupBy>('dataset')
  const params = ref<ModelParams>({ ...DEFAULT_PARAMS })
  const showClassical = ref(true)
  const showTerms = ref(false)
  const view = ref<'plot' | 'map'>('plot')
  /** The unit energies are shown and typed in (the model always works in eV). */
  const energyUnit = ref<EnergyUnit>('eV')

  function add (ids: number[]) {
    recordIds.value = [...new Set([...recordIds.value, ...ids])].slice(0, 5000)
  }
  function remove (ids: number[]) {
    const drop = new Set(ids)
    recordIds.value = recordIds.value.filter(i => !drop.has(i))
  }
  function clear () {
    recordIds.value = []
  }

  /** The part of the state a shared link carries. */
  const query = computed(() => ({
    ids: recordIds.value.join(',') || undefined,
    group: groupBy.value,
    ls: params.value.lambdaSolvent,
    li: params.value.lambdaInternal,
    hw: params.value.vibrationEnergy,
    v: params.value.coupling,
    t: params.value.temperatureK,
    cl: showClassical.value ? undefined : '0',
    terms: showTerms.value ? '1' : undefined,
    view: view.value === 'map' ? 'map' : undefined,
    unit: energyUnit.value === 'eV' ? undefined : energyUnit.value
  }))
  function fromQuery (q: Record<string, unknown>) {
    const num = (k: string, d: number) => {
      const n = Number(q[k])
      return Number.isFinite(n) && q[k] !== undefined && q[k] !== '' ? n : d
    }
    if (typeof q.ids === 'string' && /^\d+(,\d+)*$/.test(q.ids)) recordIds.value = q.ids.split(',').map(Number)
    if (['dataset', 'solvent', 'process', 'temperature'].includes(String(q.group))) groupBy.value = q.group as GroupBy
    showClassical.value = q.cl !== '0'
    showTerms.value = q.terms === '1'
    view.value = q.view === 'map' ? 'map' : 'plot'
    energyUnit.value = typeof q.unit === 'string' && isEnergyUnit(q.unit) ? q.unit : 'eV'
    const next = {
      lambdaSolvent: num('ls', DEFAULT_PARAMS.lambdaSolvent),
      lambdaInternal: num('li', DEFAULT_PARAMS.lambdaInternal),
      vibrationEnergy: num('hw', DEFAULT_PARAMS.vibrationEnergy),
      coupling: num('v', DEFAULT_PARAMS.coupling),
      temperatureK: num('t', DEFAULT_PARAMS.temperatureK)
    }
    // a link with values outside the model's bounds falls back to the defaults for those values
    for (const k of Object.keys(next) as (keyof ModelParams)[]) {
      const b = MODEL_BOUNDS[k]
      if (next[k] < b.min || next[k] > b.max) next[k] = DEFAULT_PARAMS[k]
    }
    if (next.lambdaInternal / next.vibrationEnergy > MAX_HUANG_RHYS) {
      next.lambdaInternal = DEFAULT_PARAMS.lambdaInternal
      next.vibrationEnergy = DEFAULT_PARAMS.vibrationEnergy
    }
    params.value = next
  }
  /**
   * Reads what this browser kept (after hydration: the server's empty state would otherwise win)
   * and keeps saving it. A selection given by the URL takes precedence over the kept one.
   */
  let restored = false
  function restoreLocal () {
    if (restored || !import.meta.client) return
    restored = true
    try {
      ownPoints.value = JSON.parse(localStorage.getItem('crosspoint.compare.own') ?? '[]')
      if (!recordIds.value.length) recordIds.value = JSON.parse(localStorage.getItem('crosspoint.compare.ids') ?? '[]')
    }
    catch {
      /* nothing kept */
    }
    watch(recordIds, v => localStorage.setItem('crosspoint.compare.ids', JSON.stringify(v)))
    watch(ownPoints, v => localStorage.setItem('crosspoint.compare.own', JSON.stringify(v)), { deep: true })
  }
  return {
    recordIds,
    ownPoints,
    groupBy,
    params,
    showClassical,
    showTerms,
    view,
    energyUnit,
    add,
    remove,
    clear,
    query,
    fromQuery,
    restoreLocal
  }
})
