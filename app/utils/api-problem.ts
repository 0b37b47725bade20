/** What went wrong with a call to the API, in the form every screen shows: the server's sentence and its per-field issues. */
export interface ApiIssue {
  path: string
  message: string
  row?: number
  column?: string
}
export interface ApiProblem {
  message: string
  issues?: ApiIssue[]
  status?: number
}

/** One reading of an error thrown by $fetch (or the network): the one error path for every call. */
export function apiProblem (e: unknown): ApiProblem {
  const err = e as {
    data?: { message?: string, data?: { issues?: ApiIssue[] } }
    message?: string
    statusCode?: number
    status?: number
  } | null
  return {
    message: err?.data?.message ?? err?.message ?? String(e),
    issues: err?.data?.data?.issues,
    status: err?.statusCode ?? err?.status
  }
}
