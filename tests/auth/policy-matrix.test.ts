// The authorization matrix: every action of app/auth/policy.server.ts × every role (and
// nobody signed in) × ownership and visibility. Expected answers are written out by
// hand from the role descriptions in the product brief (viewer reads what is shared,
// author creates mechanisms and proposes steps, curator reviews library steps, admin
// manages people), so a change to can() that alters any answer fails here.
import { describe, expect, it } from "vitest";
import { can, type Action, type Actor, type OwnedObject, type Role, type LibraryStep } from "../../app/auth/policy.server";

const WHO = ["anonymous", "viewer", "author", "curator", "admin"] as const;
type Who = (typeof WHO)[number];

const GROUP = 7; // the actor's group
const OTHER_GROUP = 8;
const OTHER_USER = 999;

function actor(who: Who, opts: { groupAdmin?: boolean } = {}): Actor | null {
  if (who === "anonymous") return null;
  const id = 100 + WHO.indexOf(who);
  return { id, role: who as Role, groupIds: [GROUP], adminGroupIds: opts.groupAdmin ? [GROUP] : [] };
}

/** "01101" → expected answer per WHO entry. */
function expectRow(name: string, pattern: string, make: (a: Actor | null, who: Who) => Action, opts: { groupAdmin?: boolean } = {}) {
  it(name, () => {
    const got = WHO.map((w) => {
      const a = actor(w, opts);
      return can(a, make(a, w)) ? "1" : "0";
    }).join("");
    expect(got, `${name} for ${WHO.join("/")}`).toBe(pattern);
  });
}

const own = (a: Actor | null, visibility: OwnedObject["visibility"], groupId: number | null = null): OwnedObject => ({
  ownerId: a?.id ?? OTHER_USER,
  visibility,
  groupId,
});
const others = (visibility: OwnedObject["visibility"], groupId: number | null = null): OwnedObject => ({ ownerId: OTHER_USER, visibility, groupId });

// Objects with an owner and a visibility: mechanisms, runs, datasets.
const CASES: Array<[string, (a: Actor | null) => OwnedObject]> = [
  ["own private", (a) => own(a, "private")],
  ["own in my group", (a) => own(a, "group", GROUP)],
  ["someone's private", () => others("private")],
  ["someone's, shared with my group", () => others("group", GROUP)],
  ["someone's, shared with another group", () => others("group", OTHER_GROUP)],
  ["someone's public", () => others("public")],
];

// Expected answers per case (order as CASES), for anonymous/viewer/author/curator/admin.
// For "own" rows the anonymous column is a nobody-owned object and reads as "someone's".
const READ = ["01111", "01111", "00001", "01111", "00001", "11111"];
const WRITE = ["00111", "00111", "00001", "00001", "00001", "00001"];
const FORK = ["00111", "00111", "00001", "00111", "00001", "00111"];

describe("owned objects: read", () => {
  for (const doIt of ["mechanism.read", "run.read", "dataset.read"] as const) {
    CASES.forEach(([label, obj], i) => expectRow(`${doIt} ${label}`, READ[i], (a) => ({ do: doIt, object: obj(a) })));
  }
});

describe("runs: read through the mechanism's group share", () => {
  // A private run of someone else: readable by the members of the group its mechanism is shared
  // with (and by admins), by nobody else; a public or other group's mechanism does not open it.
  const run = () => others("private");
  expectRow("run.read, mechanism shared with my group", "01111", () => ({ do: "run.read", object: run(), mechanism: others("group", GROUP) }));
  expectRow("run.read, mechanism shared with another group", "00001", () => ({ do: "run.read", object: run(), mechanism: others("group", OTHER_GROUP) }));
  expectRow("run.read, mechanism public", "00001", () => ({ do: "run.read", object: run(), mechanism: others("public") }));
  expectRow("run.cancel, own run", "01111", (a) => ({ do: "run.cancel", object: own(a, "private") }));
  expectRow("run.cancel, someone's run shared with my group", "00001", () => ({ do: "run.cancel", object: others("group", GROUP) }));
  expectRow("run.read, mechanism private", "00001", () => ({ do: "run.read", object: run(), mechanism: others("private") }));
});

describe("owned objects: write and delete (owner with author role, or admin)", () => {
  for (const doIt of ["mechanism.write", "mechanism.delete", "dataset.write"] as const) {
    CASES.forEach(([label, obj], i) => expectRow(`${doIt} ${label}`, WRITE[i], (a) => ({ do: doIt, object: obj(a) })));
  }
  it("a viewer who owns a mechanism (e.g. demoted from author) cannot edit it", () => {
    const v = actor("viewer")!;
    expect(can(v, { do: "mechanism.write", object: own(v, "private") })).toBe(false);
    expect(can(v, { do: "mechanism.read", object: own(v, "private") })).toBe(true);
  });
});

describe("owned objects: fork a mechanism, start a run (author and readable)", () => {
  for (const doIt of ["mechanism.fork", "run.create"] as const) {
    CASES.forEach(([label, obj], i) => expectRow(`${doIt} ${label}`, FORK[i], (a) => ({ do: doIt, object: obj(a) })));
  }
});

describe("creating things", () => {
  for (const doIt of ["mechanism.create", "dataset.create", "step.create"] as const) {
    expectRow(doIt, "00111", () => ({ do: doIt }));
  }
  expectRow("compute.use (any signed-in user)", "01111", () => ({ do: "compute.use" }));
  expectRow("token.manage (any signed-in user)", "01111", () => ({ do: "token.manage" }));
});

describe("library steps", () => {
  const STATUSES: LibraryStep["status"][] = ["draft", "proposed", "approved", "deprecated"];
  const step = (a: Actor | null, mine: boolean, status: LibraryStep["status"]): LibraryStep => ({ ownerId: mine && a ? a.id : OTHER_USER, status });
  // [action, mine, status] → pattern
  const table: Record<string, Record<string, string>> = {
    "step.read": {
      "mine draft": "01111", "mine proposed": "01111", "mine approved": "01111", "mine deprecated": "01111",
      "other draft": "00011", "other proposed": "00011", "other approved": "01111", "other deprecated": "01111",
    },
    "step.comment": {
      "mine draft": "01111", "mine proposed": "01111", "mine approved": "01111", "mine deprecated": "01111",
      "other draft": "00011", "other proposed": "00011", "other approved": "01111", "other deprecated": "01111",
    },
    "step.edit": {
      "mine draft": "00111", "mine proposed": "00111", "mine approved": "00111", "mine deprecated": "00011",
      "other draft": "00011", "other proposed": "00011", "other approved": "00011", "other deprecated": "00011",
    },
    "step.propose": {
      "mine draft": "00111", "mine proposed": "00000", "mine approved": "00000", "mine deprecated": "00000",
      "other draft": "00011", "other proposed": "00000", "other approved": "00000", "other deprecated": "00000",
    },
    "step.review": {
      "mine draft": "00000", "mine proposed": "00011", "mine approved": "00000", "mine deprecated": "00000",
      "other draft": "00000", "other proposed": "00011", "other approved": "00000", "other deprecated": "00000",
    },
    "step.deprecate": {
      "mine draft": "00011", "mine proposed": "00011", "mine approved": "00011", "mine deprecated": "00000",
      "other draft": "00011", "other proposed": "00011", "other approved": "00011", "other deprecated": "00000",
    },
  };
  for (const [doIt, rows] of Object.entries(table)) {
    for (const mine of [true, false]) {
      for (const status of STATUSES) {
        const key = `${mine ? "mine" : "other"} ${status}`;
        expectRow(`${doIt} ${key}`, rows[key], (a) => ({ do: doIt, object: step(a, mine, status) }) as Action);
      }
    }
  }
});

describe("people, groups and the audit log", () => {
  expectRow("user.manage", "00001", () => ({ do: "user.manage" }));
  expectRow("audit.read", "00001", () => ({ do: "audit.read" }));
  expectRow("group.create", "00001", () => ({ do: "group.create" }));
  expectRow("group.read, my group", "01111", () => ({ do: "group.read", groupId: GROUP }));
  expectRow("group.read, another group", "00001", () => ({ do: "group.read", groupId: OTHER_GROUP }));
  expectRow("group.manage, my group as plain member", "00001", () => ({ do: "group.manage", groupId: GROUP }));
  expectRow("group.manage, my group as group admin", "01111", () => ({ do: "group.manage", groupId: GROUP }), { groupAdmin: true });
  expectRow("group.manage, another group as group admin of mine", "00001", () => ({ do: "group.manage", groupId: OTHER_GROUP }), { groupAdmin: true });

  const ROLES: Role[] = ["viewer", "author", "curator", "admin"];
  for (const from of ROLES) {
    for (const to of ROLES) {
      // Site-wide roles are a site admin's alone, whatever group role the caller has.
      expectRow(`member.setRole ${from}→${to} as group admin`, "00001", () => ({ do: "member.setRole", groupId: GROUP, from, to }), {
        groupAdmin: true,
      });
      expectRow(`member.setRole ${from}→${to} as plain member`, "00001", () => ({ do: "member.setRole", groupId: GROUP, from, to }));
    }
  }
});
