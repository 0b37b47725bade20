/** One JSON object per line, the format ARCHITECTURE.md binds. */
export function report (name: string, value: number, unit: string, target: number): void {
  process.stdout.write(JSON.stringify({ name, value: Number(value.toPrecision(4)), unit, target }) + '\n')
}
