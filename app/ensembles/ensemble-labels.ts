/**
 * Words for an ensemble on screens and in exports: observables and sampled parameters by the
 * names of species and steps (never their keys), times with units. Pure: browser and server.
 */
import type { Names } from "~/components/names";
import { formatNumber } from "~/components/format";
import type { ObservableDef } from "./ensemble-plan";

/** "Conversion of Ketone", "Yield of Alcohol", "Selectivity Alcohol/(Alcohol + Ether)". */
export function observableLabel(o: Pick<ObservableDef, "kind" | "species">, n: Names): string {
  if (o.kind === "conversion") return `Conversion of ${n.species(o.species[0])}`;
  if (o.kind === "yield") return `Yield of ${n.species(o.species[0])}`;
  const [a, b] = o.species.map((s) => n.species(s));
  return `Selectivity ${a}/(${a} + ${b})`;
}

/** A sampled parameter: a step's barrier by the step's name, or the temperature. */
export function parameterLabel(parameter: string, n: Names): string {
  return parameter === "T" ? "Temperature" : `Barrier of ${n.step(parameter)}`;
}

/** A time in s, written in the largest unit that keeps it at or above 1 (s, min, h, d). */
export function timeLabel(seconds: number): string {
  if (seconds >= 86400) return `${formatNumber(seconds / 86400)} d`;
  if (seconds >= 3600) return `${formatNumber(seconds / 3600)} h`;
  if (seconds >= 60) return `${formatNumber(seconds / 60)} min`;
  return `${formatNumber(seconds)} s`;
}
