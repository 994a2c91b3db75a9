/**
 * Calls an API route module's action directly with a JSON POST (no server), for tests that
 * replace the sign-in layer with tests/support/api-auth-stand-in.ts. A thrown Response (the
 * 401 of requireApiUser) is answered like a returned one.
 */
export type RouteAction = (args: never) => Promise<Response> | Response;

export async function postJson(action: RouteAction, url: string, body: unknown, raw = false): Promise<{ status: number; json: any; text: string }> {
  const request = new Request(url, { method: "POST", headers: { "Content-Type": "application/json" }, body: raw ? (body as string) : JSON.stringify(body) });
  const res = (await (action as (a: unknown) => Promise<Response>)({ request, params: {}, context: {} }).catch((thrown: unknown) => thrown)) as Response;
  const text = await res.text();
  return { status: res.status, json: JSON.parse(text), text };
}
