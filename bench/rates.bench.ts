/**
 * Benchmark: forward rate constants of 10,000 seeded random steps (all barrier forms) at
 * 100 temperatures through rateConstantsBatch. Median wall time of repeated runs.
 */
import { rateConstantsBatch } from "../solver/rates.ts";
import { randomSteps, temperatureGrid } from "./rate-steps.ts";
import type { BenchCase } from "./types.ts";

export async function benchRates(): Promise<BenchCase[]> {
  const steps = randomSteps(10_000, 20260101);
  const temps = temperatureGrid(100, 250, 450);
  const runs = 9;
  // warm-up (JIT)
  for (let w = 0; w < 3; w++) rateConstantsBatch(steps, temps);
  const times: number[] = [];
  let checksum = 0;
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    const res = rateConstantsBatch(steps, temps);
    const t1 = performance.now();
    if (!res.ok) throw new Error(`rate batch failed: ${res.error.code} ${res.error.message}`);
    times.push(t1 - t0);
    checksum = res.value[12345];
  }
  times.sort((a, b) => a - b);
  return [
    {
      name: "rate constants: 10,000 steps × 100 temperatures (rateConstantsBatch)",
      wallMsMedian: times[Math.floor(runs / 2)],
      runs,
      extra: {
        steps: steps.length,
        temperatures: temps.length,
        values: steps.length * temps.length,
        minMs: times[0],
        maxMs: times[runs - 1],
        sampleK: checksum,
      },
    },
  ];
}
