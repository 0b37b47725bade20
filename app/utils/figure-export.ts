/** Figures and files saved from the browser: an SVG with its citing caption under the plot, its PNG, any blob. */

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
