/** One problem with an input, addressed by a JSON pointer relative to the caller's object. */
export interface InputIssue {
  path: string
  message: string
  row?: number
}

/**
 * Thrown by physics functions for non-physical or malformed input. Carries every problem found
 * (not only the first) so that an API handler can answer 422 with one JSON pointer per issue.
 */
export class PhysicsInputError extends Error {
  readonly issues: InputIssue[]
  constructor (issues: InputIssue[]) {
    super(issues.map(i => `${i.path || '/'}: ${i.message}`).join('; '))
    this.name = 'PhysicsInputError'
    this.issues = issues
  }
}

/** Collects issues while checking a set of inputs, then throws them all at once. */
export class IssueCollector {
  readonly issues: InputIssue[] = []
  add (path: string, message: string): void {
    this.issues.push({ path, message })
  }

  /** A finite number, or an issue. */
  finite (value: unknown, path: string, label: string): value is number {
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      this.add(path, `${label} must be a finite number`)
      return false
    }
    return true
  }

  /** A finite number > 0, or an issue. */
  positive (value: unknown, path: string, label: string): value is number {
    if (!this.finite(value, path, label)) return false
    if ((value as number) <= 0) {
      this.add(path, `${label} must be greater than 0`)
      return false
    }
    return true
  }

  /** A finite number ≥ 0, or an issue. */
  nonNegative (value: unknown, path: string, label: string): value is number {
    if (!this.finite(value, path, label)) return false
    if ((value as number) < 0) {
      this.add(path, `${label} must not be negative`)
      return false
    }
    return true
  }

  throwIfAny (): void {
    if (this.issues.length) throw new PhysicsInputError(this.issues)
  }
}
