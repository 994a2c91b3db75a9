import type { Route } from "./+types/mechanisms";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Mechanisms · Saddlebook" }];
}

export default function Page() {
  return (
    <div>
      <h1 className="text-2xl font-semibold tracking-tight">Mechanisms</h1>
      <p className="mt-2 text-ink-600">No mechanisms yet.</p>
    </div>
  );
}
