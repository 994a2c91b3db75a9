/**
 * POST /api/v1/activation-parameters, called through the route module's action with a plain
 * Request (no server). The k(T) tables are analytic constructions: rate constants computed
 * here from the Eyring equation k = (k_B·T/h)·e^(ΔS‡/R)·e^(−ΔH‡/RT) and from the Arrhenius
 * equation k = A·e^(−Ea/RT) (any physical chemistry text, e.g. Atkins, "activated complex
 * theory") with CODATA 2018 exact constants, so the regression must return the parameters
 * they were built from, with standard errors at rounding level.
 */
import { afterEach, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { postJson } from "../support/api-call";
import { action, loader } from "../../app/routes/api.v1.activation-parameters";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
afterEach(() => {
  apiCaller.userId = 1;
});

// CODATA 2018 exact values (k_B, h, N_A); R = k_B·N_A.
const [K_B, H, N_A] = [1.380649e-23, 6.62607015e-34, 6.02214076e23];
const R = K_B * N_A;

const URL_ = "http://localhost/api/v1/activation-parameters";
const post = (body: unknown) => postJson(action, URL_, body);

const TS = [290, 300, 310, 320, 330, 340];
const DH = 80e3; // J/mol
const DS = -20; // J/(mol K)
/** Eyring k in s⁻¹ or L mol⁻¹ s⁻¹ (1 mol/L standard state), κ = 1. */
const eyringK = (T: number) => ((K_B * T) / H) * Math.exp(DS / R) * Math.exp(-DH / (R * T));
const perSecond = { concentration: "mol/L", time: "s" };

function expectErrorShape(json: any) {
  expect(Object.keys(json)).toEqual(["error"]);
  expect(typeof json.error.code).toBe("string");
  expect(typeof json.error.message).toBe("string");
}

describe("POST /api/v1/activation-parameters", () => {
  it("returns the ΔH‡ and ΔS‡ an exact Eyring table was built from, and ΔG‡ at the stated temperature", async () => {
    const points = TS.map((T) => ({ T, k: eyringK(T) }));
    const { status, json } = await post({ points, temperatureUnit: "K", rateUnit: perSecond, molecularity: 1, referenceTemperature: { value: 298.15, unit: "K" } });
    expect(status).toBe(200);
    expect(json.eyring.dH.unit).toBe("kJ/mol");
    expect(json.eyring.dH.value).toBeCloseTo(80, 8);
    expect(json.eyring.dS.value).toBeCloseTo(-20, 6);
    expect(json.eyring.dS.unit).toBe("J/(mol K)");
    // ΔG‡(298.15 K) = ΔH‡ − T·ΔS‡ = 80 + 298.15·0.020 = 85.963 kJ/mol
    expect(json.eyring.dG.value).toBeCloseTo(85.963, 7);
    expect(json.eyring.referenceTemperature).toEqual({ value: 298.15, unit: "K" });
    expect(json.eyring.dH.standardError).toBeLessThan(1e-6);
    expect(json.eyring.r2).toBeCloseTo(1, 12);
    expect(json.n).toBe(6);
    expect(json.dof).toBe(4);
    expect(json.kUnit).toBe("s⁻¹");
    expect(json.standardState).toBe("1M");
  });

  it("returns the Ea and A an exact Arrhenius table was built from (A = 1e13 s⁻¹, Ea = 100 kJ/mol)", async () => {
    const points = TS.map((T) => ({ T: T - 273.15, k: 1e13 * Math.exp(-100e3 / (R * T)) * 60 })); // °C and per minute
    const { status, json } = await post({ points, temperatureUnit: "°C", rateUnit: { concentration: "mol/L", time: "min" }, molecularity: 1, units: { energy: "kcal/mol" } });
    expect(status).toBe(200);
    expect(json.arrhenius.Ea.value).toBeCloseTo(100 / 4.184, 7); // thermochemical calorie
    expect(json.arrhenius.Ea.unit).toBe("kcal/mol");
    expect(json.arrhenius.A.value / 1e13).toBeCloseTo(1, 8);
    expect(json.arrhenius.A.unit).toBe("s⁻¹");
    expect(json.arrhenius.lnA.value).toBeCloseTo(Math.log(1e13), 8);
    // ΔG‡ reported at the mean measured temperature when none is named, and said so
    expect(json.eyring.referenceTemperature.value).toBeCloseTo(315, 9);
  });

  it("converts a bimolecular k in cm³ molecule⁻¹ s⁻¹ to L mol⁻¹ s⁻¹ before the fit (1 cm³/molecule = N_A·10⁻³ L/mol)", async () => {
    const points = TS.map((T) => ({ T, k: eyringK(T) / (N_A * 1e-3) }));
    const { status, json } = await post({ points, temperatureUnit: "K", rateUnit: { concentration: "molecules/cm3", time: "s" }, molecularity: 2 });
    expect(status).toBe(200);
    expect(json.kUnit).toBe("L mol⁻¹ s⁻¹");
    expect(json.eyring.dH.value).toBeCloseTo(80, 7);
    expect(json.eyring.dS.value).toBeCloseTo(-20, 5);
  });

  it("weighted by σ_k: equal relative uncertainties give the unweighted answer", async () => {
    const points = TS.map((T) => {
      const k = eyringK(T) * (1 + 0.01 * Math.sin(T));
      return { T, k, sigmaK: 0.02 * k };
    });
    const plain = await post({ points: points.map(({ T, k }) => ({ T, k })), temperatureUnit: "K", rateUnit: perSecond, molecularity: 1 });
    const weighted = await post({ points, temperatureUnit: "K", rateUnit: perSecond, molecularity: 1 });
    expect(weighted.status).toBe(200);
    expect(weighted.json.eyring.dH.value).toBeCloseTo(plain.json.eyring.dH.value, 9);
  });

  it("a body that does not match the schema is 400 with the field named", async () => {
    const { status, json } = await post({ points: [{ T: 300, k: 1 }], rateUnit: perSecond, molecularity: 1 });
    expect(status).toBe(400);
    expectErrorShape({ error: { code: json.error.code, message: json.error.message } });
    expect(Object.keys(json.error.fields)).toEqual(expect.arrayContaining(["points", "temperatureUnit"]));
  });

  it("a table the regression cannot use is 422 with the engine's reason", async () => {
    const same = await post({ points: [{ T: 300, k: 1 }, { T: 300, k: 2 }, { T: 300, k: 3 }], temperatureUnit: "K", rateUnit: perSecond, molecularity: 1 });
    expect(same.status).toBe(422);
    expect(same.json.error.code).toBe("temperatures_not_distinct");
    const cold = await post({ points: [{ T: -300, k: 1 }, { T: 20, k: 2 }, { T: 30, k: 3 }], temperatureUnit: "°C", rateUnit: perSecond, molecularity: 1 });
    expect(cold.status).toBe(422);
    expect(Object.keys(cold.json.error.fields)).toEqual(["points[0].T"]);
  });

  it("a caller who is not signed in gets 401 in the error shape", async () => {
    apiCaller.userId = 0;
    const { status, json } = await post({});
    expect(status).toBe(401);
    expectErrorShape(json);
  });

  it("GET is 405 with Allow: POST", async () => {
    const res = (await loader({ request: new Request(URL_), params: {}, context: {} } as unknown as Parameters<typeof loader>[0])) as Response;
    expect(res.status).toBe(405);
    expect(res.headers.get("Allow")).toBe("POST");
    expectErrorShape(await res.json());
  });
});
