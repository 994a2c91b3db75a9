import type { Route } from "./+types/data";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Measured data · Saddlebook" }];
}

export default function Page() {
  return (
    <div>
      <h1 className="text-2xl font-semibold tracking-tight">Measured data</h1>
      <p className="mt-2 text-ink-600">No datasets uploaded yet.</p>
    </div>
  );
}
