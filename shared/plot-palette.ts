/** Crosspoint's categorical plot colours: chosen to stay apart under the common colour-vision deficiencies. */
export const PLOT_PALETTE = [
  '#1f6f8b',
  '#d68a4f',
  '#4f9a45',
  '#a4508b',
  '#d9b43a',
  '#5e60c9',
  '#8c5a3c',
  '#3fa7a0',
  '#c24b4b',
  '#6d7f8c'
]
/** Model curves in near-black, apart from every data colour above; the classical curve is also dashed. */
export const CURVE_COLORS = { classical: '#3b3f46', semiclassical: '#101418' }
