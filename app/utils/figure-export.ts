/** Figures and files saved from the browser: the plot with legend and citing caption as SVG, its PNG, any blob. */
import { csvFile } from '#shared/records/csv'

const SVG_NS = 'http://www.w3.org/2000/svg'
export interface LegendEntry {
  label: string
  color: string
  kind: 'dot' | 'line'
  dash?: string
}

function el (name: string, attrs: Record<string, string | number>, text?: string): SVGElement {
  const e = document.createElementNS(SVG_NS, name)
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v))
  if (text !== undefined) e.textContent = text
  return e
}

/** Words in lines of at most `max` characters. */
export function wrapWords (text: string, max: number): string[] {
  const lines: string[] = []
  let line = ''
  for (const word of text.split(/\s+/).filter(Boolean)) {
    if (line && line.length + 1 + word.length > max) {
      lines.push(line)
      line = word
    }
    else line = line ? `${line} ${word}` : word
  }
  if (line) lines.push(line)
  return lines
}

/**
 * A standalone figure: the plot's own SVG, its legend (points by group, model curves by line style) and the caption
 * citing the data, all inside one viewBox so that the file and its PNG show every part.
 */
export function captionedSvg (plot: SVGSVGElement, caption: string, legend: LegendEntry[] = []): string {
  const w = Number(plot.getAttribute('width')) || plot.getBoundingClientRect().width
  const h = Number(plot.getAttribute('height')) || plot.getBoundingClientRect().height
  const root = el('svg', { 'xmlns': SVG_NS, 'width': w, 'height': 0, 'font-family': 'Public Sans, system-ui, sans-serif' })
  root.appendChild(el('rect', { x: 0, y: 0, width: w, height: '100%', fill: 'white' }))
  const inner = plot.cloneNode(true) as SVGSVGElement
  inner.setAttribute('x', '0')
  inner.setAttribute('y', '0')
  root.appendChild(inner)
  // legend: entries side by side, wrapped to the width
  let x = 8
  let y = h + 14
  const legendGroup = el('g', { 'data-part': 'legend', 'font-size': 10 })
  for (const e of legend) {
    const width = 22 + e.label.length * 5.6
    if (x + width > w - 8 && x > 8) {
      x = 8
      y += 16
    }
    legendGroup.appendChild(
      e.kind === 'dot'
        ? el('circle', { cx: x + 5, cy: y - 3, r: 4, fill: e.color })
        : el('line', {
            'x1': x, 'y1': y - 3, 'x2': x + 14, 'y2': y - 3, 'stroke': e.color, 'stroke-width': 2,
            ...(e.dash ? { 'stroke-dasharray': e.dash } : {})
          })
    )
    legendGroup.appendChild(el('text', { x: x + 18, y }, e.label))
    x += width + 12
  }
  if (legend.length) root.appendChild(legendGroup)
  const top = legend.length ? y + 10 : h
  // the caption: about 5.2 px a character at 9.5 px type
  const lines = wrapWords(caption, Math.max(40, Math.floor((w - 16) / 5.2)))
  const captionGroup = el('g', { 'data-part': 'caption', 'font-size': 9.5, 'fill': '#222' })
  lines.forEach((l, i) => captionGroup.appendChild(el('text', { x: 8, y: top + 13 * (i + 1) }, l)))
  root.appendChild(captionGroup)
  const height = Math.ceil(top + 13 * lines.length + 10)
  root.setAttribute('height', String(height))
  root.setAttribute('viewBox', `0 0 ${w} ${height}`)
  return new XMLSerializer().serializeToString(root)
}

/** Offers a blob as a download under the given name. */
export function saveBlob (name: string, blob: Blob): void {
  const a = document.createElement('a')
  a.href = URL.createObjectURL(blob)
  a.download = name
  a.click()
  setTimeout(() => URL.revokeObjectURL(a.href), 10_000)
}

/** A PNG of an SVG text at twice its size, on white. */
export async function svgToPng (svg: string): Promise<Blob | null> {
  const img = new Image()
  img.src = URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' }))
  await img.decode()
  const c = document.createElement('canvas')
  c.width = img.width * 2
  c.height = img.height * 2
  const ctx = c.getContext('2d')!
  ctx.fillStyle = 'white'
  ctx.fillRect(0, 0, c.width, c.height)
  ctx.scale(2, 2)
  ctx.drawImage(img, 0, 0)
  return new Promise(resolve => c.toBlob(resolve, 'image/png'))
}

/**
 * The points and curves of a comparison as CSV through the shared writer (RFC 4180 quoting, formula cells
 * such as = + - @ neutralised, as in the bundles).
 */
export function comparisonCsv (
  points: { id?: number, deltaG: number, log10Rate: number, group?: string }[],
  rows: { id: number, doi: string | null }[],
  curves: { name: string, points: { deltaG: number, log10Rate: number }[] }[]
): string {
  const out: unknown[][] = []
  for (const p of points)
    out.push(['point', p.id ?? '', rows.find(r => r.id === p.id)?.doi ?? '', p.deltaG, p.log10Rate, String(p.group ?? '')])
  for (const c of curves) for (const q of c.points) out.push([`curve ${c.name}`, '', '', q.deltaG, q.log10Rate, ''])
  return csvFile(['kind', 'record_id', 'dataset_identifier', 'delta_g (eV)', 'log10_rate (log10 s-1)', 'group'], out)
}

/** The citations of several datasets in one format, one after another. */
export async function citationsOf (datasetIds: number[], format: 'bibtex' | 'ris'): Promise<string> {
  const parts = await Promise.all(
    datasetIds.map(id => $fetch<string>(`/api/v1/datasets/${id}/citation?format=${format}`, { responseType: 'text' }))
  )
  return parts.join('\n')
}
