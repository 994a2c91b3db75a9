/**
 * Values computed once per request and shared by everything that runs for it (the shell's
 * loader, the page's loader, the action): the root middleware opens a scope around the whole
 * request, and `onceInRequest` answers a key from that scope after its first computation.
 * Outside a request (tests that call loaders directly, scripts) nothing is remembered.
 */
import { AsyncLocalStorage } from "node:async_hooks";
import type { MiddlewareFunction } from "react-router";

const scope = new AsyncLocalStorage<Map<string, unknown>>();

export const requestScopeMiddleware: MiddlewareFunction<Response> = (_args, next) => scope.run(new Map(), next);

export function onceInRequest<T>(key: string, compute: () => T): T {
  const values = scope.getStore();
  if (!values) return compute();
  if (values.has(key)) return values.get(key) as T;
  const value = compute();
  values.set(key, value);
  return value;
}
