/**
 * Shared pieces of the property-based bad-input tests (fast-check): values that break naive
 * handlers, and a mutation that puts one of them somewhere inside a valid body.
 */
import fc from "fast-check";

/** Huge, tiny and non-integer numbers, HTML/SQL/control/unicode text, odd JSON shapes, long strings. */
export const nasty = fc.oneof(
  fc.constantFrom(
    1e308, -1e308, 5e-324, -0, 0, -1, 1e21, Number.MAX_SAFE_INTEGER + 2, 2 ** 31, -(2 ** 31) - 1,
    "<script>alert(1)</script>", "'; DROP TABLE steps; --", "\" OR 1=1 --", "Ω‡ΔG°—µ", "\u0000", "\ud83e\uddea", "\u202e", "",
    null, true, [], {}, { __proto__: { polluted: 1 } }, [[[[[[[[[[1]]]]]]]]]],
  ),
  fc.string({ maxLength: 40 }),
  fc.double(),
  fc.integer(),
  fc.string({ minLength: 5000, maxLength: 30000 }),
);

/** Replaces one leaf (or adds one unknown field) somewhere inside `value`. */
export function mutate(value: unknown, path: number[], replacement: unknown): unknown {
  if (value === null || typeof value !== "object") return replacement;
  const keys = Object.keys(value as object);
  if (!keys.length || path.length === 0) return Array.isArray(value) ? [...value, replacement] : { ...(value as object), extraField: replacement };
  const key = keys[path[0]! % keys.length]!;
  const copy: any = Array.isArray(value) ? [...value] : { ...(value as object) };
  copy[key] = mutate(copy[key], path.slice(1), replacement);
  return copy;
}
