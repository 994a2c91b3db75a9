/**
 * Writes docs/mechanism-format.schema.json from the zod schema of the mechanism exchange
 * format (solver/exchange-format.ts). Run: npx tsx scripts/gen-format-schema.ts
 * (tests/solver/exchange-format.test.ts fails when the committed file is out of date).
 */
import { writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { mechanismJsonSchema } from "../solver/exchange-format.ts";

export function mechanismSchemaText(): string {
  return `${JSON.stringify(mechanismJsonSchema(), null, 2)}\n`;
}

const target = fileURLToPath(new URL("../docs/mechanism-format.schema.json", import.meta.url));
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  writeFileSync(target, mechanismSchemaText());
  console.log(`wrote ${target}`);
}
