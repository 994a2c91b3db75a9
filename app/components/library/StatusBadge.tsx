/** Library status as a small badge: draft, proposed, approved, deprecated. */
const STYLE: Record<string, string> = {
  draft: "bg-ink-100 text-ink-700",
  proposed: "bg-amber-note text-copper-700",
  approved: "bg-moss-100 text-moss-700",
  deprecated: "bg-brick-100 text-brick-700",
};

export function StatusBadge({ status }: { status: string }) {
  return <span className={`inline-block rounded px-1.5 py-0.5 text-xs font-medium ${STYLE[status] ?? STYLE.draft}`}>{status}</span>;
}

export function IllustrativeNote() {
  return (
    <p className="rounded-md bg-amber-note px-3 py-2 text-xs text-ink-700">
      The demo library and mechanisms are an invented, illustrative scenario — not measured or published data.
    </p>
  );
}
