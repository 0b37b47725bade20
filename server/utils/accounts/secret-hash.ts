/** sha256 of a secret token (API tokens, one-time links): what is stored instead of the token. */
import { createHash } from 'node:crypto'

export function hashToken (token: string): string {
  return createHash('sha256').update(token).digest('hex')
}
