import { Link } from "react-router";
import type { Route } from "./+types/home";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Saddlebook" }, { name: "description", content: "Elementary steps, mechanisms, rate constants and simulations for a research group." }];
}

const AREAS = [
  {
    to: "/library",
    title: "Step library",
    text: "The group's curated elementary steps with activation parameters, provenance and review status.",
  },
  {
    to: "/mechanisms",
    title: "Mechanisms",
    text: "Assemble steps into mechanisms, see k(T) for every step, fork a colleague's mechanism and compare.",
  },
  {
    to: "/runs",
    title: "Runs",
    text: "Concentration against time from the stiff integrator: half-lives, conversion, selectivity, rate control.",
  },
  {
    to: "/data",
    title: "Measured data",
    text: "Concentration–time uploads for overlays and barrier fits; k(T) tables for Eyring and Arrhenius analysis.",
  },
];

export default function Home() {
  return (
    <div className="space-y-6">
      <section>
        <h1 className="text-2xl font-semibold tracking-tight">Workbench</h1>
        <p className="mt-1 max-w-3xl text-ink-600">
          Transition-state-theory rate constants at your conditions, mass-action models integrated with a stiff solver,
          and the provenance of every number.
        </p>
      </section>
      <section className="grid gap-4 sm:grid-cols-2">
        {AREAS.map((a) => (
          <Link key={a.to} to={a.to} className="panel block transition-shadow hover:shadow-md">
            <h2 className="font-semibold text-ink-900">{a.title}</h2>
            <p className="mt-1 text-sm text-ink-600">{a.text}</p>
          </Link>
        ))}
      </section>
    </div>
  );
}
