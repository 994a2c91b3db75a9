/** Types for the direct CommonJS entry of the `odex` package (same API as types/odex.d.ts). */
declare module "odex/src/odex.js" {
  export * from "odex";
}
