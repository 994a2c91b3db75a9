/** Route helpers around the policy module: the signed-in user who may do an action, or 403. */
import { data } from "react-router";
import { can, type Action } from "./policy.server";
import { requireUser, type SessionUser } from "./current-user.server";

export async function requireCan(request: Request, action: Action | ((u: SessionUser) => Action), message?: string): Promise<SessionUser> {
  const user = await requireUser(request);
  const a = typeof action === "function" ? action(user) : action;
  if (!can(user, a)) throw data(message ?? "Your role does not allow this.", { status: 403 });
  return user;
}
