/** "Restore as vN": posts intent=restore for an earlier version, based on the current one (a stale base is refused by the server). */
import { Form } from "react-router";
import { CsrfInput } from "../CsrfInput";

export function RestoreVersionButton({ version, current, label, disabled }: { version: number; current: number; label: string; disabled?: boolean }) {
  return (
    <Form method="post" className="ml-2 inline">
      <CsrfInput />
      <input type="hidden" name="intent" value="restore" />
      <input type="hidden" name="version" value={version} />
      <input type="hidden" name="baseVersion" value={current} />
      <button className="btn-quiet px-2 py-0 text-xs" disabled={disabled} aria-label={label}>
        Restore as v{current + 1}
      </button>
    </Form>
  );
}
