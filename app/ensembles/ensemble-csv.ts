/**
 * CSV exports of an ensemble, in the layout of app/components/plots/results-csv.ts: `#` lines
 * (what the file is, the units, a key from each column to the mechanism's ids), one header row of
 * names with units, then the values at full precision.
 *  - members: one row per member — its parameters (T in K, initial concentrations in mol/L,
 *    barrier shifts in kJ/mol by step name), then each observable at each chosen time (fraction).
 *  - summary: one row per observable and output time — n, mean, sd and percentiles (fraction).
 * Pure: browser and server.
 */
import type { Names } from "~/components/names";
import { cell, esc, flat } from "~/components/plots/results-csv";
import { valueKey, type EnsembleMember, type EnsembleSummary } from "../../solver/ensemble";
import type { ObservableDef } from "./ensemble-plan";
import { observableLabel, timeLabel } from "./ensemble-labels";

export interface MemberCsvRow {
  index: number;
  member: EnsembleMember;
  ok: boolean | null;
  values: Record<string, number> | null;
  error: string | null;
}

const J_PER_KJ = 1000;

function document(lines: string[], header: string[], rows: string[][]): string {
  return [...lines.map((l) => `# ${flat(l)}`), header.map(esc).join(","), ...rows.map((r) => r.join(","))].join("\n") + "\n";
}

export function membersCsv(o: { title: string; names: Names; stepOrder: string[]; observables: ObservableDef[]; times: number[]; chosen: number[]; rows: MemberCsvRow[] }): string {
  const n = o.names;
  const withT = o.rows.some((r) => r.member.T !== null);
  const species = [...new Set(o.rows.flatMap((r) => Object.keys(r.member.initial)))];
  const used = new Set(o.rows.flatMap((r) => Object.keys(r.member.shifts)));
  const steps = o.stepOrder.filter((s) => used.has(s));
  const key: string[] = [];
  const header = ["member", "status"];
  if (withT) header.push("T (K)");
  for (const s of species) {
    header.push(`${n.species(s)} initial (mol/L)`);
    key.push(`${n.species(s)} initial = initial concentration of species ${n.species(s)} (id ${s})`);
  }
  for (const s of steps) {
    header.push(`${n.step(s)} barrier shift (kJ/mol)`);
    key.push(`${n.step(s)} barrier shift = added to the barrier of step ${n.step(s)} (id ${s}; ${n.reaction(s)})`);
  }
  for (const ob of o.observables) for (const k of o.chosen) header.push(`${observableLabel(ob, n)} at ${timeLabel(o.times[k])} (fraction)`);
  const rows = o.rows.map((r) => {
    const out = [String(r.index + 1), r.ok === null ? "not computed" : r.ok ? "ok" : esc(`failed: ${flat(r.error ?? "")}`)];
    if (withT) out.push(cell(r.member.T));
    for (const s of species) out.push(cell(r.member.initial[s]));
    for (const s of steps) out.push(cell(r.member.shifts[s] === undefined ? 0 : r.member.shifts[s] / J_PER_KJ));
    for (const ob of o.observables) for (const k of o.chosen) out.push(cell(r.values?.[valueKey(ob.key, k)]));
    return out;
  });
  return document(
    [
      o.title,
      "One row per member: its parameters, then the observables at the chosen times. Units are in each column header: T in K, initial concentrations in mol/L, barrier shifts in kJ/mol (added to the step's free energy of activation; forward and reverse rates change alike), observables as fractions (0–1).",
      "Key: column header = what it is in the mechanism (id).",
      ...key,
    ],
    header,
    rows,
  );
}

export function summaryCsv(o: { title: string; names: Names; observables: ObservableDef[]; summary: EnsembleSummary }): string {
  const header = ["observable", "time (s)", "chosen time", "members", "mean (fraction)", "sd (fraction)", "p5 (fraction)", "p25 (fraction)", "p50 (fraction)", "p75 (fraction)", "p95 (fraction)"];
  const chosen = new Set(o.summary.chosen);
  const rows: string[][] = [];
  for (const ob of o.observables) {
    const s = o.summary.observables.find((x) => x.key === ob.key);
    if (!s) continue;
    o.summary.times.forEach((t, k) => {
      const d = s.series[k];
      rows.push([esc(observableLabel(ob, o.names)), cell(t), chosen.has(k) ? "yes" : "no", String(d?.n ?? 0), ...(d ? [d.mean, d.sd, d.p5, d.p25, d.p50, d.p75, d.p95] : Array(7).fill(null)).map(cell)]);
    });
  }
  const m = o.summary.members;
  return document(
    [
      o.title,
      `Distribution of each observable over the ${m.ok} members that were simulated (of ${m.total}); percentiles interpolate between ordered members. Units: time in s, observables as fractions (0–1).`,
      "Key: conversion = 1 − c(t)/c(0) of the reactant; yield = c(t) of the product / c(0) of the reactant; selectivity = first/(first + second).",
    ],
    header,
    rows,
  );
}
