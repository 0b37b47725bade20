/** One JSON object per line: the figures a benchmark run prints, for people and for scripts. */
export function report (name: string, value: number, unit: string, target: number): void {
  process.stdout.write(JSON.stringify({ name, value: Number(value.toPrecision(4)), unit, target }) + '\n')
}
