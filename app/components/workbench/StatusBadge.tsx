/** A run's status as a small coloured label, with the share of simulated time while it runs. */
const STATUS_STYLE: Record<string, string> = {
  queued: "bg-ink-100 text-ink-700",
  running: "bg-copper-100 text-copper-700",
  done: "bg-moss-100 text-moss-700",
  failed: "bg-brick-100 text-brick-700",
  cancelled: "bg-ink-100 text-ink-500",
};

export function StatusBadge({ status, fraction }: { status: string; fraction?: number }) {
  return (
    <span className={`rounded px-1.5 py-0.5 text-xs font-medium ${STATUS_STYLE[status] ?? ""}`} data-testid="run-status">
      {status}
      {status === "running" && fraction !== undefined ? ` ${Math.round(fraction * 100)} %` : ""}
    </span>
  );
}
