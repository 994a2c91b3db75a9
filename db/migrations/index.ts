/**
 * The ordered list of migrations. Knex reads them from here rather than from the
 * file system, so the same list works under tsx, vitest and the built server.
 * Append new migrations at the end; never edit one that has shipped.
 */
import type { Knex } from "knex";
import * as m0001 from "./0001_identity";
import * as m0100 from "./0100_auth_tokens";
import * as m0101 from "./0101_session_epoch";
import * as m0200 from "./0200_library";
import * as m0210 from "./0210_mechanisms";
import * as m0300 from "./0300_workbench";
import * as m0310 from "./0310_workbench_mechanism_links";
import * as m0320 from "./0320_run_server_process";
import * as m0102 from "./0102_ended_sessions";
import * as m0230 from "./0230_open_and_fractional_steps";
import * as m0240 from "./0240_thermal_reference_temperature";
import * as m0330 from "./0330_ensembles";

interface Migration {
  up(knex: Knex): Promise<void>;
  down(knex: Knex): Promise<void>;
}

const list: Array<[string, Migration]> = [
  ["0001_identity", m0001],
  ["0100_auth_tokens", m0100],
  ["0101_session_epoch", m0101],
  ["0200_library", m0200],
  ["0210_mechanisms", m0210],
  ["0300_workbench", m0300],
  ["0310_workbench_mechanism_links", m0310],
  ["0320_run_server_process", m0320],
  ["0102_ended_sessions", m0102],
  ["0230_open_and_fractional_steps", m0230],
  ["0240_thermal_reference_temperature", m0240],
  ["0330_ensembles", m0330],
];

export const migrationSource: Knex.MigrationSource<string> = {
  async getMigrations() {
    return list.map(([name]) => name);
  },
  getMigrationName(name) {
    return name;
  },
  async getMigration(name) {
    const found = list.find(([n]) => n === name);
    if (!found) throw new Error(`Unknown migration ${name}`);
    return found[1];
  },
};
