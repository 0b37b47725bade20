/**
 * Control characters (C0, DEL, C1) that have no place in a one-line field: a CR/LF there starts a new record in RIS
 * or a new tag line in bag-info.txt.
 */
// eslint-disable-next-line no-control-regex
export const CONTROL_CHARS = /[\u0000-\u001F\u007F-\u009F\u2028\u2029]/
// eslint-disable-next-line no-control-regex
const CONTROL_CHARS_EXCEPT_LINES = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F]/

/** Whether a one-line field holds a control character. */
export function hasControlChars (s: string): boolean {
  return CONTROL_CHARS.test(s)
}
/** Whether a multi-line field (tabs and line breaks allowed) holds another control character. */
export function hasOtherControlChars (s: string): boolean {
  return CONTROL_CHARS_EXCEPT_LINES.test(s)
}

/** A value for a one-line output field: control characters folded to spaces (a last guard for values stored before the check). */
export function oneLine (s: string): string {
  // eslint-disable-next-line no-control-regex
  return s.replace(/[\u0000-\u001F\u007F-\u009F\u2028\u2029]+/g, ' ')
}
