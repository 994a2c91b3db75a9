/** /api/v1/docs — the REST API description as a readable page (from /api/v1/openapi.json). */
import { openApiDocument } from "~/api/library-openapi.server";
import type { Route } from "./+types/api.v1.openapi.docs";

export function meta(): Route.MetaDescriptors {
  return [{ title: "API · Saddlebook" }];
}

interface Op {
  method: string;
  path: string;
  summary: string;
  body: string | null;
  params: Array<{ name: string; where: string; description?: string }>;
  responses: Array<[string, string]>;
}

export async function loader() {
  const doc = openApiDocument() as { info: { description: string }; paths: Record<string, Record<string, Record<string, unknown>>>; components: { schemas: Record<string, unknown> } };
  const ops: Op[] = [];
  for (const [path, methods] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(methods)) {
      const rb = op.requestBody as { content?: Record<string, { schema?: { $ref?: string } }> } | undefined;
      const ref = rb?.content?.["application/json"]?.schema?.$ref;
      ops.push({
        method: method.toUpperCase(),
        path: `/api/v1${path}`,
        summary: String(op.summary ?? ""),
        body: ref ? ref.split("/").pop()! : null,
        params: ((op.parameters as Array<{ name: string; in: string; description?: string }>) ?? []).map((p) => ({ name: p.name, where: p.in, description: p.description })),
        responses: Object.entries(op.responses as Record<string, { description: string }>).map(([c, r]) => [c, r.description]),
      });
    }
  }
  const schemas = Object.fromEntries(Object.entries(doc.components.schemas).map(([k, v]) => [k, JSON.stringify(v, null, 2)]));
  return { intro: doc.info.description, ops, schemas };
}

export default function ApiDocs({ loaderData }: Route.ComponentProps) {
  const { intro, ops, schemas } = loaderData;
  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">REST API</h1>
        <p className="mt-2 max-w-3xl text-sm text-ink-700">{intro}</p>
        <p className="mt-2 text-sm">
          Machine-readable description: <a className="text-copper-700 underline" href="/api/v1/openapi.json">/api/v1/openapi.json</a> (OpenAPI 3.1).
        </p>
      </div>
      <div className="space-y-3">
        {ops.map((o) => (
          <section key={o.method + o.path} className="panel" id={`${o.method}-${o.path}`}>
            <h2 className="font-mono text-sm">
              <span className="mr-2 rounded bg-ink-100 px-1.5 py-0.5 font-semibold">{o.method}</span>
              {o.path}
            </h2>
            <p className="mt-1 text-sm text-ink-800">{o.summary}</p>
            {o.params.length > 0 && (
              <ul className="mt-2 text-xs text-ink-700">
                {o.params.map((p) => (
                  <li key={p.where + p.name}>
                    <code>{p.name}</code> ({p.where}){p.description ? ` — ${p.description}` : ""}
                  </li>
                ))}
              </ul>
            )}
            {o.body && (
              <p className="mt-2 text-xs">
                Body: <a className="text-copper-700 underline" href={`#schema-${o.body}`}>{o.body}</a>
              </p>
            )}
            <p className="mt-2 text-xs text-ink-600">{o.responses.map(([c, d]) => `${c} ${d}`).join(" · ")}</p>
          </section>
        ))}
      </div>
      <div>
        <h2 className="text-lg font-semibold">Schemas</h2>
        {Object.entries(schemas).map(([k, v]) => (
          <details key={k} id={`schema-${k}`} className="panel mt-2">
            <summary className="cursor-pointer font-mono text-sm">{k}</summary>
            <pre className="mt-2 max-h-96 overflow-auto text-xs">{v}</pre>
          </details>
        ))}
      </div>
    </div>
  );
}
