/**
 * Saving a fit as new step versions, on the demo scenario: the fitted shift moves the library
 * step's barrier in its own form (ΔG‡ + δ for the dG form), the SE becomes its uncertainty and the
 * dataset its provenance; a stale pin and a mechanism-less fit are refused with the reason.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { getVersionSnapshot } from "../../db/access/mechanisms.server";
import { getStepRow, getStepVersionById } from "../../db/access/steps.server";
import { saveFitAsStepVersions } from "../../app/compute/fit-save.server";
import { shiftDocumentStep } from "../../app/compute/fit-task";
import type { FitRecord } from "../../db/access/fits.server";

let t: TestDatabase;
beforeAll(async () => {
  t = await freshDatabase();
  await seedDemo(t.db);
});
afterAll(async () => {
  await t?.drop();
});

async function curator() {
  const u = await t.db("users").where({ email: "curator@saddlebook.test" }).first();
  return { id: u.id as number, role: "curator" as const, groupIds: [], adminGroupIds: [] };
}

describe("save a fit as new step versions", () => {
  it("writes the fitted barrier, its SE and the provenance as a new version of the library step", async () => {
    const mech = await t.db("mechanisms").orderBy("id").first();
    const { snapshot } = await getVersionSnapshot(t.db, mech.id, mech.current_version);
    const entry = snapshot.steps.find((e) => e.kind === "library") as { key: string; stepId: number; stepVersionId: number };
    const before = (await getStepVersionById(t.db, entry.stepVersionId))!;
    const shift = 1500, se = 120; // J/mol
    const fitted = shiftDocumentStep({ ...before.content, id: entry.key }, shift);
    const fit = {
      id: 99,
      ownerId: 1,
      mechanismId: mech.id,
      mechanismVersion: mech.current_version,
      snapshotHash: "",
      datasetIds: [1],
      chosenSteps: [entry.key],
      fitted: [{ stepId: entry.key, shift, se, ci: 2 * se, atBound: false, form: before.content.barrier.form, before: { value: 0, unit: "", label: "" }, after: { value: 0, unit: "", label: "" }, fittedStep: fitted }],
      residuals: [],
      statistics: {} as FitRecord["statistics"],
      createdAt: new Date(),
    } as FitRecord;
    const out = await saveFitAsStepVersions(t.db, await curator(), fit, "HPLC run 7");
    expect(out[0].saved).toBe(true);
    const s = (await getStepRow(t.db, entry.stepId))!;
    const v = (await getStepVersionById(t.db, s.current_version_id))!;
    expect(v.number).toBe(before.number + 1);
    const b0 = before.content.barrier as { form: string; unit?: string; dG?: number; dH?: number; Ea?: number };
    const b1 = v.content.barrier as typeof b0;
    const key = b0.form === "dG" ? "dG" : b0.form === "dHdS" ? "dH" : "Ea";
    const perUnit = b0.unit === "kcal/mol" ? 4184 : b0.unit === "J/mol" ? 1 : 1000;
    expect(((b1[key as "dG"] ?? 0) - (b0[key as "dG"] ?? 0)) * perUnit).toBeCloseTo(shift, 3);
    expect(v.content.provenance?.notes).toMatch(/HPLC run 7/);
    expect(v.content.uncertainty?.value).toBeCloseTo(se / perUnit, 6);

    // the pin is now stale: a second save is refused with the reason
    const again = await saveFitAsStepVersions(t.db, await curator(), fit, "HPLC run 7");
    expect(again[0].saved).toBe(false);
    expect(again[0].message).toMatch(/newer version/);
  });

  it("refuses a fit whose model was not a stored mechanism", async () => {
    const out = await saveFitAsStepVersions(t.db, await curator(), { id: 1, mechanismId: null, mechanismVersion: null, fitted: [{ stepId: "x" }] } as unknown as FitRecord, "d");
    expect(out[0]).toMatchObject({ saved: false });
    expect(out[0].message).toMatch(/not made from a stored mechanism/);
  });
});
