/**
 * The one authorization module: "may this user do this to that object?"
 *
 * Every route, action and API call asks `can()` (or `assertCan()`); nothing else checks
 * roles. Global roles rank viewer < author < curator < admin; group membership decides
 * what group-visible objects a user may read.
 */

export type Role = "viewer" | "author" | "curator" | "admin";

export const ROLES: readonly Role[] = ["viewer", "author", "curator", "admin"] as const;

/** The requesting user as the policy sees them. */
export interface Actor {
  id: number;
  role: Role;
  /** Ids of the groups the user belongs to. */
  groupIds: number[];
  /** Ids of the groups the user administers. */
  adminGroupIds?: number[];
}

/** Something with an owner and a visibility (mechanisms, runs, datasets). */
export interface OwnedObject {
  ownerId: number;
  visibility: "private" | "group" | "public";
  /** Group the object is shared with when visibility is "group". */
  groupId?: number | null;
}

/** A library step as the policy sees it. */
export interface LibraryStep {
  ownerId: number;
  status: "draft" | "proposed" | "approved" | "deprecated";
}

export type Action =
  | { do: "mechanism.create" }
  | { do: "mechanism.read"; object: OwnedObject }
  | { do: "mechanism.write"; object: OwnedObject }
  | { do: "mechanism.fork"; object: OwnedObject }
  | { do: "mechanism.delete"; object: OwnedObject }
  | { do: "run.create"; object: OwnedObject } // object: the mechanism
  // A run is read by whoever may read it as an object of its own, and (read only) by the members
  // of the group its mechanism is shared with.
  | { do: "run.read"; object: OwnedObject; mechanism?: OwnedObject | null }
  | { do: "run.cancel"; object: OwnedObject } // stop a queued or running run or ensemble: its owner, or an admin
  | { do: "dataset.create" }
  | { do: "dataset.read"; object: OwnedObject }
  | { do: "dataset.write"; object: OwnedObject }
  | { do: "step.read"; object: LibraryStep }
  | { do: "step.create" }
  | { do: "step.edit"; object: LibraryStep }
  | { do: "step.propose"; object: LibraryStep }
  | { do: "step.review"; object: LibraryStep } // approve, request changes
  | { do: "step.deprecate"; object: LibraryStep }
  | { do: "step.comment"; object: LibraryStep }
  | { do: "compute.use" }
  | { do: "token.manage" }
  | { do: "user.manage" }
  | { do: "audit.read" }
  | { do: "group.create" }
  | { do: "group.read"; groupId: number }
  | { do: "group.manage"; groupId: number } // invite, change group roles, remove members
  // Change a group member's site-wide role (from the group page). Site-wide roles reach past
  // the group, so only site admins change them; a group admin manages group roles only.
  | { do: "member.setRole"; groupId: number; from: Role; to: Role };

const RANK: Record<Role, number> = { viewer: 0, author: 1, curator: 2, admin: 3 };

export function atLeast(actor: Actor | null, role: Role): boolean {
  return !!actor && RANK[actor.role] >= RANK[role];
}

function readsOwned(actor: Actor | null, o: OwnedObject): boolean {
  if (o.visibility === "public") return true;
  if (!actor) return false;
  if (o.ownerId === actor.id || actor.role === "admin") return true;
  return o.visibility === "group" && o.groupId != null && actor.groupIds.includes(o.groupId);
}

function sharedWithActorsGroup(actor: Actor | null, o: OwnedObject | null | undefined): boolean {
  return !!actor && !!o && o.visibility === "group" && o.groupId != null && actor.groupIds.includes(o.groupId);
}

/** True when `actor` (null: not signed in) may perform `action`. */
export function can(actor: Actor | null, action: Action): boolean {
  switch (action.do) {
    case "mechanism.read":
    case "dataset.read":
      return readsOwned(actor, action.object);
    case "run.read":
      return readsOwned(actor, action.object) || sharedWithActorsGroup(actor, action.mechanism);
    case "mechanism.create":
    case "dataset.create":
    case "step.create":
      return atLeast(actor, "author");
    case "run.cancel":
      return !!actor && (action.object.ownerId === actor.id || actor.role === "admin");
    case "mechanism.write":
    case "mechanism.delete":
    case "dataset.write":
      return !!actor && atLeast(actor, "author") && (action.object.ownerId === actor.id || actor.role === "admin");
    case "run.cancel":
      return !!actor && (action.object.ownerId === actor.id || actor.role === "admin");
    case "mechanism.fork":
      return atLeast(actor, "author") && readsOwned(actor, action.object);
    case "run.create":
      return atLeast(actor, "author") && readsOwned(actor, action.object);
    case "step.read":
      // Approved and deprecated steps are the shared library; drafts and proposals are
      // visible to their owner and to curators (who review them).
      if (action.object.status === "approved" || action.object.status === "deprecated") return !!actor;
      return !!actor && (action.object.ownerId === actor.id || atLeast(actor, "curator"));
    case "step.edit":
      // Editing makes a new version; authors edit their own drafts, curators any step.
      if (!actor) return false;
      if (atLeast(actor, "curator")) return true;
      return atLeast(actor, "author") && action.object.ownerId === actor.id && action.object.status !== "deprecated";
    case "step.propose":
      return (
        !!actor &&
        atLeast(actor, "author") &&
        (action.object.ownerId === actor.id || atLeast(actor, "curator")) &&
        action.object.status === "draft"
      );
    case "step.review":
      return atLeast(actor, "curator") && action.object.status === "proposed";
    case "step.deprecate":
      return atLeast(actor, "curator") && action.object.status !== "deprecated";
    case "step.comment":
      return can(actor, { do: "step.read", object: action.object });
    case "compute.use":
    case "token.manage":
      return !!actor;
    case "user.manage":
    case "audit.read":
    case "group.create":
      return atLeast(actor, "admin");
    case "group.read":
      return !!actor && (actor.role === "admin" || actor.groupIds.includes(action.groupId));
    case "group.manage":
      return !!actor && (actor.role === "admin" || (actor.adminGroupIds ?? []).includes(action.groupId));
    case "member.setRole":
      return atLeast(actor, "admin");
  }
}

/** True when `actor` may review proposed library steps (the review queue and its place in the navigation). */
export function mayReviewProposals(actor: Actor | null): boolean {
  return can(actor, { do: "step.review", object: { ownerId: -1, status: "proposed" } });
}

/** Thrown by assertCan(); routes turn it into 403 (or 401 when nobody is signed in). */
export class Forbidden extends Error {
  constructor(
    readonly signedIn: boolean,
    message: string,
  ) {
    super(message);
  }
}

export function assertCan(actor: Actor | null, action: Action, message = "You do not have permission to do this."): void {
  if (!can(actor, action)) throw new Forbidden(!!actor, actor ? message : "Sign in first.");
}
