/**
 * Security headers on every answer, with a per-request nonce for the page's inline scripts (added
 * to the rendered HTML in plugins/csp-nonce.ts). Static files get theirs from the route rules.
 */
import { randomBytes } from 'node:crypto'

export default defineEventHandler((event) => {
  const nonce = randomBytes(16).toString('base64')
  event.context.cspNonce = nonce
  const csp = [
    'default-src \'self\'',
    `script-src 'self' 'nonce-${nonce}'`,
    'style-src \'self\' \'unsafe-inline\'',
    'img-src \'self\' data: blob:',
    'font-src \'self\' data:',
    'connect-src \'self\'',
    'object-src \'none\'',
    'base-uri \'self\'',
    'form-action \'self\'',
    'frame-ancestors \'none\''
  ].join('; ')
  setHeaders(event, {
    'content-security-policy': csp,
    'x-content-type-options': 'nosniff',
    'referrer-policy': 'same-origin',
    'x-frame-options': 'DENY',
    'permissions-policy': 'camera=(), microphone=(), geolocation=()',
    'cross-origin-opener-policy': 'same-origin'
  })
  if (getRequestURL(event).protocol === 'https:') setHeader(event, 'strict-transport-security', 'max-age=31536000')
})
