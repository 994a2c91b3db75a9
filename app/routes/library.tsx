import type { Route } from "./+types/library";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Library · Saddlebook" }];
}

export default function Page() {
  return (
    <div>
      <h1 className="text-2xl font-semibold tracking-tight">Library</h1>
      <p className="mt-2 text-ink-600">No steps have been added to the library yet.</p>
    </div>
  );
}
