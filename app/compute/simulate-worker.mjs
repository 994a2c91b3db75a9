// Worker thread of the compute pool (piscina). Loads the TypeScript tasks through tsx.
// A run: progress goes to a shared Float64Array (simulated time reached, s), a shared
// Int32Array flag asks it to stop (the engine checks it at every step). A fit, and a stateless
// simulate or rates API request (app/compute/api-pool.server.ts): same flag. The compute queue's
// jobs (app/queue/worker.server.ts): an ensemble chunk (members done counted in progress[0],
// the flag checked between members) and the queue's probe job.
import { tsImport } from "tsx/esm/api";

const { runTask } = await tsImport("./run-task.ts", import.meta.url);
const { fitTask } = await tsImport("./fit-task.ts", import.meta.url);

let simulateApi;
let ratesApi;
let ensembleTask;

export default async function computeTask({ kind = "run", input, progress, control }) {
  const ctl = new Int32Array(control);
  const signal = {
    get aborted() {
      return Atomics.load(ctl, 0) === 1;
    },
  };
  if (kind === "fit") return fitTask(input, { signal });
  if (kind === "simulate-api") {
    // The stateless simulate API: the answer travels back as status, headers and body text.
    new Float64Array(progress)[1] = 1; // started (the caller's watchdog counts from here)
    simulateApi ??= await tsImport("../api/compute-simulate.server.ts", import.meta.url);
    const res = await simulateApi.answerSimulate(JSON.parse(input.text), input.text, signal);
    return { status: res.status, headers: [...res.headers], body: await res.text() };
  }
  if (kind === "rates-api") {
    // The rates API: a bounded answer (compute-rates.server.ts caps its size), text back.
    new Float64Array(progress)[1] = 1;
    ratesApi ??= await tsImport("../api/compute-rates.server.ts", import.meta.url);
    const res = ratesApi.answerRates(JSON.parse(input.text), input.text);
    return { status: res.status, headers: [...res.headers], body: await res.text() };
  }
  if (kind === "warm-up") {
    // A queue worker loads the engine before it takes jobs, so the first job is not slower.
    ensembleTask ??= await tsImport("../ensembles/ensemble-task.ts", import.meta.url);
    return null;
  }
  if (kind === "ensemble-chunk") {
    const prog = new Float64Array(progress);
    ensembleTask ??= await tsImport("../ensembles/ensemble-task.ts", import.meta.url);
    return ensembleTask.runEnsembleChunk(input, { shouldStop: () => signal.aborted, onMemberDone: () => (prog[0] += 1) });
  }
  if (kind === "queue-probe") {
    // Busy for spinMs (as a chunk of members would be), stopping early when asked.
    const end = Date.now() + input.spinMs;
    let spins = 0;
    while (Date.now() < end && !signal.aborted) spins++;
    return { stopped: signal.aborted, spins };
  }
  const prog = new Float64Array(progress);
  prog[1] = 1; // started
  return runTask(input, { signal, onProgress: (t) => (prog[0] = t) });
}
