/**
 * GET /api/v1/health — {"status":"ok","db":"ok","queue":"ok"}, or 503 with the reason when the
 * database is down. The compute queue's Redis is reported beside it ("ok", "down" with
 * queueReason, or "off" without REDIS_URL); pages and the API work without it (ensembles
 * wait), so it never makes the answer 503.
 */
import { databaseProblem } from "../../db/client.server";
import { queueProblem } from "../queue/queue.server";

const noStore = { "Cache-Control": "no-store" };

async function queueState(): Promise<{ queue: "ok" | "down" | "off"; queueReason?: string }> {
  if (!process.env.REDIS_URL) return { queue: "off" };
  const problem = await queueProblem(500);
  return problem ? { queue: "down", queueReason: problem } : { queue: "ok" };
}

export async function loader() {
  const [problem, queue] = await Promise.all([databaseProblem(), queueState()]);
  if (problem) {
    return Response.json({ status: "degraded", db: "down", reason: problem, ...queue }, { status: 503, headers: noStore });
  }
  return Response.json({ status: "ok", db: "ok", ...queue }, { headers: noStore });
}
