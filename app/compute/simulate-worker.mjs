// Worker thread of the compute pool (piscina). Loads the TypeScript tasks through tsx.
// A run: progress goes to a shared Float64Array (simulated time reached, s), a shared
// Int32Array flag asks it to stop (the engine checks it at every step). A fit: same flag.
import { tsImport } from "tsx/esm/api";

const { runTask } = await tsImport("./run-task.ts", import.meta.url);
const { fitTask } = await tsImport("./fit-task.ts", import.meta.url);

export default function computeTask({ kind = "run", input, progress, control }) {
  const ctl = new Int32Array(control);
  const signal = {
    get aborted() {
      return Atomics.load(ctl, 0) === 1;
    },
  };
  if (kind === "fit") return fitTask(input, { signal });
  const prog = new Float64Array(progress);
  prog[1] = 1; // started
  return runTask(input, { signal, onProgress: (t) => (prog[0] = t) });
}
