/** The narrow card the sign-in, registration and password pages share. */
import type { ReactNode } from "react";

export function AuthCard({ title, lead, children }: { title: string; lead?: ReactNode; children: ReactNode }) {
  return (
    <div className="mx-auto mt-6 max-w-md">
      <div className="panel">
        <h1 className="text-xl font-semibold text-ink-900">{title}</h1>
        {lead && <p className="mt-1 text-sm text-ink-600">{lead}</p>}
        <div className="mt-4">{children}</div>
      </div>
    </div>
  );
}

export function Notice({ tone = "info", children }: { tone?: "info" | "error" | "ok"; children: ReactNode }) {
  const cls =
    tone === "error"
      ? "border-brick-500 bg-brick-100 text-brick-700"
      : tone === "ok"
        ? "border-moss-500 bg-moss-100 text-moss-700"
        : "border-ink-200 bg-ink-50 text-ink-700";
  return (
    <p role={tone === "error" ? "alert" : "status"} className={`mb-3 rounded-md border px-3 py-2 text-sm ${cls}`}>
      {children}
    </p>
  );
}

export function Field({
  label,
  name,
  type = "text",
  defaultValue,
  error,
  autoComplete,
  required,
  hint,
}: {
  label: string;
  name: string;
  type?: string;
  defaultValue?: string;
  error?: string;
  autoComplete?: string;
  required?: boolean;
  hint?: string;
}) {
  const id = `f-${name}`;
  return (
    <div className="mb-3">
      <label className="label" htmlFor={id}>
        {label}
      </label>
      <input
        id={id}
        name={name}
        type={type}
        defaultValue={defaultValue}
        autoComplete={autoComplete}
        required={required}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-err` : undefined}
        className={`field ${error ? "field-error" : ""}`}
      />
      {hint && !error && <p className="mt-1 text-xs text-ink-500">{hint}</p>}
      {error && (
        <p id={`${id}-err`} className="mt-1 text-xs text-brick-700">
          {error}
        </p>
      )}
    </div>
  );
}
