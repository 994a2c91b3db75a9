// Runtime binding to the CommonJS `odex` package for solver/nonstiff.ts (types in
// odex-binding.d.ts). The specifier is extensionless on purpose: the project tsconfig maps
// "odex" and "odex/src/odex.js" to a type-only stub, and tsx applies that mapping at run time
// too; "odex/src/odex" reaches the real file under tsx, Vite and Vitest alike.
import * as odexModule from "odex/src/odex";

// CommonJS interop: named exports under Node ESM, or under `default` with some bundlers.
export const Solver = odexModule.Solver ?? odexModule.default.Solver;
