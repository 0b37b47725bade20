/** What each fit status means, in the words the screens show (one text for Compare and Rate models). */
export const FIT_STATUS_TEXT = {
  'converged': 'Converged: a minimum with every free parameter inside its range.',
  'at-bound':
    'Best fit at the edge of the allowed range for the parameters marked below: a constrained minimum, not a free one.',
  'stalled':
    'Not converged: the optimizer stopped without confirming a minimum. The values are the best found, not a result.'
} as const
