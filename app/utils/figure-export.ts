/** Figures and files saved from the browser: an SVG with its citing caption under the plot, its PNG, any blob. */
import { csvFile } from '#shared/records/csv'

/** The plot's SVG with the caption written under it in lines of at most 150 characters, as a standalone file. */
export function captionedSvg (svg: SVGSVGElement, caption: string): string {
  const clone = svg.cloneNode(true) as SVGSVGElement
  const w = Number(clone.getAttribute('width'))
  const h = Number(clone.getAttribute('height'))
  const lines = caption.match(/.{1,150}(\s|$)/g) ?? [caption]
  clone.setAttribute('height', String(h + 16 * lines.length + 10))
  clone.setAttribute('xmlns', 'http://www.w3.org/2000/svg')
  lines.forEach((l, i) => {
    const t = document.createElementNS('http://www.w3.org/2000/svg', 'text')
    t.setAttribute('x', '8')
    t.setAttribute('y', String(h + 16 * (i + 1)))
    t.setAttribute('font-size', '10')
    t.setAttribute('font-family', 'sans-serif')
    t.textContent = l.trim()
    clone.appendChild(t)
  })
  return new XMLSerializer().serializeToString(clone).replace('<svg', `<svg data-width="${w}"`)
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
