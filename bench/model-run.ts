import { curveBench, fitBench } from './model'

const word = process.argv[2] ?? ''
if (!word || 'model.curve.points_per_second'.includes(word)) curveBench()
if (!word || ['model.fit28.median_ms', 'model.fit5000.median_ms'].some(n => n.includes(word))) fitBench()
