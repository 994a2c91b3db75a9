/** A mechanism diff as tables: steps added, removed, changed (old → new, effect on k at T), species. */
import type { MechanismDiff } from "../../../db/access/mechanism-diff";
import { sig } from "./format";
import { fieldText, fieldValueText } from "../field-text";

export function DiffView({ diff, fromLabel, toLabel }: { diff: MechanismDiff; fromLabel: string; toLabel: string }) {
  const { steps, species } = diff;
  const nameOf = (k: string) => diff.speciesNames?.[k] ?? k;
  if (diff.identical) return <p className="text-sm text-ink-600">No differences between {fromLabel} and {toLabel}.</p>;
  return (
    <div className="space-y-4 text-sm" data-testid="diff">
      <p className="text-ink-700">
        {fromLabel} → {toLabel}: {steps.added.length} step(s) added, {steps.removed.length} removed, {steps.changed.length} changed, {steps.unchanged} unchanged
        {diff.reordered ? "; order changed" : ""}. Rate constants at <span className="num">{sig(diff.T, 5)} K</span>.
      </p>
      {diff.nameChanged && (
        <p>
          Name: <del className="text-brick-700">{diff.nameChanged.old}</del> → <ins className="text-moss-700 no-underline">{diff.nameChanged.new}</ins>
        </p>
      )}
      {steps.added.length > 0 && (
        <section>
          <h3 className="font-semibold text-moss-700">Steps added</h3>
          <ul className="mt-1 space-y-0.5">
            {steps.added.map((s) => (
              <li key={s.key}>
                + {s.label} <span className="text-ink-500">({s.kind === "library" ? `library v${s.versionNumber}` : "local"})</span> · k ={" "}
                <span className="num">{sig(s.rate.k)}</span> {s.rate.unit}
              </li>
            ))}
          </ul>
        </section>
      )}
      {steps.removed.length > 0 && (
        <section>
          <h3 className="font-semibold text-brick-700">Steps removed</h3>
          <ul className="mt-1 space-y-0.5">
            {steps.removed.map((s) => (
              <li key={s.key}>
                − {s.label} · k was <span className="num">{sig(s.rate.k)}</span> {s.rate.unit}
              </li>
            ))}
          </ul>
        </section>
      )}
      {steps.changed.length > 0 && (
        <section>
          <h3 className="font-semibold text-copper-700">Steps changed</h3>
          {steps.changed.map((c) => (
            <div key={c.key} className="mt-2 rounded border border-ink-200 p-2">
              <p className="font-medium">{c.label}</p>
              {c.pin && (
                <p className="text-xs text-ink-600">
                  Source: {c.pin.from} → {c.pin.to}
                </p>
              )}
              <table className="mt-1 text-xs">
                <thead>
                  <tr className="text-left text-ink-500">
                    <th className="pr-4">Field</th>
                    <th className="pr-4">Old</th>
                    <th>New</th>
                  </tr>
                </thead>
                <tbody>
                  {c.fields.map((f) => (
                    <tr key={f.path}>
                      <td className="pr-4">{fieldText(f.path)}</td>
                      <td className="num pr-4 text-brick-700">{fieldValueText(f.path, f.old, nameOf)}</td>
                      <td className="num text-moss-700">{fieldValueText(f.path, f.new, nameOf)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-1 text-xs">
                k({sig(diff.T, 5)} K): <span className="num">{sig(c.rateOld.k)}</span> → <span className="num">{sig(c.rateNew.k)}</span> {c.rateNew.unit || c.rateOld.unit}
                {c.ratio !== null && (
                  <>
                    {" "}
                    (× <span className="num">{sig(c.ratio, 3)}</span>)
                  </>
                )}
              </p>
            </div>
          ))}
        </section>
      )}
      {(species.added.length > 0 || species.removed.length > 0) && (
        <section>
          <h3 className="font-semibold">Species</h3>
          {species.added.length > 0 && <p>Added: {species.added.map((s) => s.label).join(", ")}</p>}
          {species.removed.length > 0 && <p>Removed: {species.removed.map((s) => s.label).join(", ")}</p>}
        </section>
      )}
    </div>
  );
}
