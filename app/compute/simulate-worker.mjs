// Worker thread of the simulation pool (piscina). Loads the TypeScript run task through tsx and
// runs one stored run: progress goes to a shared Float64Array (simulated time reached, s), a
// shared Int32Array flag asks it to stop (the engine checks it at every step).
import { tsImport } from "tsx/esm/api";

const { runTask } = await tsImport("./run-task.ts", import.meta.url);

export default function simulateRun({ input, progress, control }) {
  const prog = new Float64Array(progress);
  const ctl = new Int32Array(control);
  const signal = {
    get aborted() {
      return Atomics.load(ctl, 0) === 1;
    },
  };
  prog[1] = 1; // started
  return runTask(input, { signal, onProgress: (t) => (prog[0] = t) });
}
