/** Runs every benchmark whose name contains the word given (all when none). Figures only; never fails a build. */
import { curveBench, fitBench } from './model'

const word = process.argv[2] ?? ''
const benches: [string[], () => void | Promise<void>][] = [
  [['model.curve.points_per_second'], curveBench],
  [['model.fit28.median_ms', 'model.fit5000.median_ms'], fitBench]
]
for (const [names, run] of benches) {
  if (!word || names.some(n => n.includes(word))) await run()
}
