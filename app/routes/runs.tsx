import type { Route } from "./+types/runs";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Runs · Saddlebook" }];
}

export default function Page() {
  return (
    <div>
      <h1 className="text-2xl font-semibold tracking-tight">Runs</h1>
      <p className="mt-2 text-ink-600">No simulation runs yet.</p>
    </div>
  );
}
