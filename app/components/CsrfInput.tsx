/** The hidden CSRF field every state-changing form carries (token from the root loader). */
import { useRouteLoaderData } from "react-router";

export function CsrfInput() {
  const root = useRouteLoaderData("root") as { csrf?: string } | undefined;
  return <input type="hidden" name="csrf" value={root?.csrf ?? ""} />;
}
