/** GET /api/v1/health — {"status":"ok","db":"ok"}, or 503 with the reason. */
import { databaseProblem } from "../../db/client.server";

export async function loader() {
  const problem = await databaseProblem();
  if (problem) {
    return Response.json({ status: "degraded", db: "down", reason: problem }, { status: 503, headers: { "Cache-Control": "no-store" } });
  }
  return Response.json({ status: "ok", db: "ok" }, { headers: { "Cache-Control": "no-store" } });
}
