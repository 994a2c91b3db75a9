// GET /api/v1/health reports the database and the compute queue: ok on the served app, 503
// with a reason when the database does not answer.
import { describe, expect, it } from "vitest";

describe.skipIf(!process.env.APP_URL)("health endpoint of the served app", () => {
  it("answers ok with the database and the queue's Redis up", async () => {
    const r = await fetch(process.env.APP_URL + "/api/v1/health");
    expect(r.status).toBe(200);
    expect(await r.json()).toEqual({ status: "ok", db: "ok", queue: "ok" });
  });
  it("answers unknown API paths with a JSON 404", async () => {
    const r = await fetch(process.env.APP_URL + "/api/v1/no-such-thing");
    expect(r.status).toBe(404);
    const body = (await r.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe("not_found");
  });
});
