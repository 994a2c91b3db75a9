/**
 * Runs a request through the root route's middleware (security headers, the API's origin and
 * body-type checks, page form checks, the request scope) and then `handler`, as the served app
 * does, for tests that call route modules directly. Returns what the handler returned (a
 * Response, data() or a plain object) when the middleware let the request through, else what
 * the middleware answered or threw.
 */
import * as root from "../../app/root";

export async function throughRoot(request: Request, params: Record<string, string>, handler: () => Promise<unknown>): Promise<unknown> {
  const chain = [...root.middleware];
  let reached = false;
  let value: unknown;
  const run = async (i: number): Promise<Response> => {
    if (i < chain.length) return (await chain[i]!({ request, params, context: {} } as never, () => run(i + 1))) as Response;
    reached = true;
    try {
      value = await handler();
    } catch (e) {
      value = e;
    }
    // The framework turns data into a response; middleware above only needs one to decorate.
    return value instanceof Response ? value : new Response(null);
  };
  try {
    const answer = await run(0);
    return reached ? value : answer;
  } catch (e) {
    return reached ? value : e;
  }
}
