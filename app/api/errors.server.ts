/** The one error body of the REST API: {"error":{"code","message","fields"}}. */
export interface ApiErrorBody {
  error: { code: string; message: string; fields?: Record<string, string> };
}

export function apiError(status: number, code: string, message: string, fields?: Record<string, string>, headers?: HeadersInit): Response {
  const body: ApiErrorBody = { error: { code, message, ...(fields ? { fields } : {}) } };
  return Response.json(body, { status, headers });
}
