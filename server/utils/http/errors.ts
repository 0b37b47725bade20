/** One error helper for every route: status, a plain message, and per-field issues (JSON pointers). */
import { createError } from 'h3'
import { PhysicsInputError, type InputIssue } from '../../../shared/physics/errors'

export type Issue = InputIssue

export const MESSAGES = {
  invalidBody: 'The request body is not valid; see data.issues for each problem',
  invalidQuery: 'The query string is not valid; see data.issues for each problem',
  notFound: 'Not found',
  signInRequired: 'Sign in (or send an API token) to do this',
  forbidden: 'Your role does not allow this',
  published: 'Published versions cannot be changed; start a new version instead'
} as const

export function httpError (statusCode: number, message: string, issues?: Issue[]) {
  return createError({
    statusCode,
    statusMessage: statusText(statusCode),
    message,
    data: issues ? { issues } : undefined
  })
}

/** Maps a physics refusal to 422 with its pointers (prefixed with where the object sat in the body). */
export function rethrowPhysics (e: unknown, prefix = ''): never {
  if (e instanceof PhysicsInputError) {
    throw httpError(
      422,
      e.issues.length === 1 ? e.issues[0]!.message : MESSAGES.invalidBody,
      e.issues.map(i => ({ ...i, path: prefix + i.path }))
    )
  }
  throw e
}

function statusText (s: number): string {
  return (
    (
      {
        400: 'Bad Request',
        401: 'Unauthorized',
        403: 'Forbidden',
        404: 'Not Found',
        409: 'Conflict',
        413: 'Payload Too Large',
        422: 'Unprocessable Entity',
        429: 'Too Many Requests'
      } as Record<number, string>
    )[s] ?? 'Error'
  )
}
