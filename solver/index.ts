/**
 * Public entry of the kinetics engine. Application code imports from here only; the modules
 * behind it may change. Every function returns Result<T> (types.ts) instead of throwing, and
 * states the units of its arguments and results in its own module.
 */
export type { Barrier, EngineError, ReactionThermo, Result, Species, StandardState, StepKinetics, StoichTerm } from "./types.ts";

// constants (CODATA 2018) and units
export { C_LIGHT, CAL_TH, E_CHARGE, FARADAY, HARTREE_J, H_PLANCK, KB_OVER_H, K_B, N_A, P_ATM, P_STANDARD, R_GAS } from "./constants.ts";
export {
  CONCENTRATION_UNITS,
  ENERGY_UNITS,
  ENTROPY_UNITS,
  MAX_TEMPERATURE_K,
  RATE_CONSTANT_UNITS,
  TEMPERATURE_UNITS,
  TIME_UNITS,
  concentrationFromMolPerL,
  concentrationToMolPerL,
  energyFromJPerMol,
  energyToJPerMol,
  entropyFromSI,
  entropyToSI,
  rateConstantFromSI,
  rateConstantToSI,
  rateConstantUnit,
  rateConstantUnitLabel,
  formatOrder,
  MAX_ORDER,
  temperatureFromK,
  temperatureToK,
  timeFromSeconds,
  timeToSeconds,
  type ConcentrationUnit,
  type EnergyUnit,
  type EntropyUnit,
  type RateConstantUnitLabel,
  type TemperatureUnit,
  type TimeUnit,
} from "./units.ts";
export { STANDARD_STATES, describeStandardStateShift, standardConcentration, standardStateShift } from "./standard-state.ts";
export { wignerKappa } from "./tunnelling.ts";

// rate constants, barrier conversions, detailed balance, cycles
export {
  compileStep,
  convertBarrier,
  eyringFrequency,
  molecularity,
  rateConstant,
  rateConstantsBatch,
  type BarrierConversion,
  type CompiledRate,
  type RateConstantValue,
} from "./rates.ts";
export {
  equilibriumConstant,
  equilibriumConstantUnit,
  rateConstantsBatchBoth,
  reverseRateConstant,
  type EquilibriumValue,
  type ReverseRateValue,
} from "./detailed-balance.ts";
export { checkThermoCycles, findThermoCycles, type ThermoCycle } from "./thermo-cycles.ts";

// formulas and element balance
export { FORMULA_MAX_LENGTH, checkElementBalance, parseFormula, type BalanceReport, type BalanceTerm, type ParsedFormula } from "./formula.ts";

// model and simulation
export { compileMechanism, type CompiledModel, type MechanismInput, type ReactionInput } from "./model.ts";
export { buildMechanism, stepRateFunctions, type KineticMechanism } from "./step-rates.ts";
export {
  simulate,
  type ConversionEvent,
  type ConversionEventRequest,
  type SimulateOptions,
  type SimulationMethod,
  type SimulationResult,
  type StepRateFunctions,
} from "./simulate.ts";
export type { TemperatureProgram } from "./temperature-program.ts";
export type { OutputGrid } from "./output-grid.ts";
export type { IntegrationStats, StopReason } from "./ode-problem.ts";

// analysis, regression, fitting
export {
  barrierSensitivities,
  degreeOfRateControl,
  halfLife,
  massBalanceReport,
  timesToConversion,
  yieldsAndSelectivity,
  type MassBalanceReport,
  type Outcome,
  type OutcomeSensitivity,
  type RateControlReport,
  type YieldReport,
  type YieldRequest,
} from "./analysis.ts";
export { arrheniusRegression, eyringRegression, type ArrheniusResult, type EyringResult, type RatePoint } from "./regression.ts";
export { fitBarriers, shiftBarrier, type FitExperiment, type FitOptions, type FitParameter, type FitResult, type Observation } from "./fit.ts";
export { energeticSpan, type EnergeticSpan, type EnergeticSpanInput } from "./energetic-span.ts";
export { findCatalyticCycle, reactionPath, type CycleStep, type PathState, type PathStep, type PathTransitionState, type ReactionPath } from "./reaction-path.ts";
