/** Types of the runtime binding in odex-binding.js: the odex Solver class. */
export { Solver } from "odex";
