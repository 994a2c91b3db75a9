// Two per-request savings of the sign-in layer:
//  - rememberVerified (app/auth/session.server.ts): a session cookie whose signature was checked
//    once is answered from memory, as a fresh copy; a tampered or unknown cookie is never
//    remembered and always fails the check; other cookies in the header do not matter.
//  - onceInRequest (app/auth/request-scope.server.ts): inside one request scope a value is
//    computed once; separate requests, and calls outside any request, compute afresh.
import { describe, expect, it, vi } from "vitest";
import { createCookie } from "react-router";
import { rememberVerified } from "../../app/auth/session.server";
import { onceInRequest, requestScopeMiddleware } from "../../app/auth/request-scope.server";

describe("verified session cookies", () => {
  it("checks a signature once per cookie value and hands out copies", async () => {
    const base = createCookie("__test", { secrets: ["request-scope-test-secret"], path: "/" });
    const parse = vi.spyOn(base, "parse");
    const cookie = rememberVerified(base, 2);
    const header = (await base.serialize({ userId: 7 })).split(";")[0]!;
    parse.mockClear();

    const a = (await cookie.parse(`other=1; ${header}`)) as { userId: number };
    const b = (await cookie.parse(`${header}; other=2`)) as { userId: number };
    expect(a).toEqual({ userId: 7 });
    expect(b).toEqual({ userId: 7 });
    expect(a).not.toBe(b); // a copy each time: one caller's change cannot reach another
    expect(parse).toHaveBeenCalledTimes(1);

    // a tampered value fails, every time, and is not remembered
    const tampered = header.replace(/.$/, (c) => (c === "A" ? "B" : "A"));
    expect(await cookie.parse(tampered)).toBeNull();
    expect(await cookie.parse(tampered)).toBeNull();
    expect(parse).toHaveBeenCalledTimes(3);
    // no session cookie at all
    expect(await cookie.parse("other=1")).toBeNull();
  });
});

describe("values computed once per request", () => {
  it("shares a value within a request only", async () => {
    let computed = 0;
    const value = () => onceInRequest("k", () => ++computed);
    const inRequest = () =>
      (requestScopeMiddleware as unknown as (args: unknown, next: () => Promise<number[]>) => Promise<number[]>)({}, async () => [value(), await Promise.resolve().then(value)]);
    expect(await inRequest()).toEqual([1, 1]);
    expect(await inRequest()).toEqual([2, 2]);
    expect(value()).toBe(3); // outside a request nothing is remembered
    expect(value()).toBe(4);
  });
});
