/**
 * The commander program: flags to options, then a call into one command module. Each command
 * returns its exit code; nothing here writes files itself.
 */
import { Command, Option } from "commander";
import type { Io } from "./context.js";
import { runAllocate } from "./commands/allocate.js";
import { runDecode } from "./commands/decode.js";
import { runDiff } from "./commands/diff.js";
import { runEmit } from "./commands/emit.js";
import { runLint } from "./commands/lint.js";
import { runRelease } from "./commands/release.js";
import { runRules } from "./commands/rules.js";
import { VERSION } from "./version.js";

export function buildProgram(io: Io): Command & { exitCode?: number } {
  const program = new Command() as Command & { exitCode?: number };
  const done = (code: number) => {
    program.exitCode = code;
  };
  program
    .name("sidcarve")
    .description("Plan SRv6 SIDs: allocate locators and SIDs, lint plans and inventories, emit per-router SID tables.")
    .version(VERSION)
    .exitOverride()
    .configureOutput({ writeOut: io.out, writeErr: io.err })
    .showHelpAfterError();

  program
    .command("allocate")
    .description("allocate locators and SIDs for PLAN and record them in its lock file")
    .argument("<plan>", "plan file (YAML or JSON)")
    .option("--lock <file>", "lock file (default: <plan>.lock.json beside the plan)")
    .option("--allow-renumber", "accept edits that move locked values (old values are retired)")
    .option("--dry-run", "show the result without writing the lock")
    .action(async (plan: string, flags) => done(await runAllocate(plan, flags, io)));

  program
    .command("emit")
    .description("write the per-router SID tables of an allocated plan")
    .argument("<plan>", "plan file")
    .addOption(new Option("--format <format>", "table format").choices(["csv", "json"]).default("csv"))
    .option("--out <dir>", "folder to write into (default: standard output)")
    .option("--per-node", "one file per node")
    .option("--lock <file>", "lock file (default: <plan>.lock.json beside the plan)")
    .option("--force", "overwrite files that sidcarve did not write")
    .action(async (plan: string, flags) => done(await runEmit(plan, flags, io)));

  program
    .command("decode")
    .description("explain addresses: block, levels, node, behaviour, function and argument")
    .argument("<address...>", "IPv6 addresses")
    .requiredOption("--plan <plan>", "plan file")
    .option("--lock <file>", "lock file")
    .addOption(new Option("--format <format>", "output format").choices(["text", "json"]).default("text"))
    .action(async (addresses: string[], flags) => done(await runDecode(addresses, flags, io)));

  program
    .command("lint")
    .description("check a plan's allocation, or a SID table from a live network, before rollout")
    .argument("<input>", "a plan (YAML/JSON) or a SID table (.csv, or .json in the sid-table format)")
    .option("--plan <plan>", "with a SID table: the plan that declares summaries, infrastructure, anycast groups and pools")
    .option("--lock <file>", "with a plan: its lock file")
    .addOption(new Option("--format <format>", "report format").choices(["text", "json", "sarif"]).default("text"))
    .addOption(new Option("--fail-on <severity>", "exit 1 when a finding at or above this severity remains").choices(["error", "warning", "info"]).default("error"))
    .option("--report <file>", "write the report to a file (atomically) instead of standard output")
    .option("--force", "with --report: overwrite a file that sidcarve did not write")
    .action(async (input: string, flags) => done(await runLint(input, flags, io)));

  program
    .command("rules")
    .description("list every lint rule, or explain one")
    .argument("[id]", "rule id")
    .addOption(new Option("--format <format>", "output format").choices(["text", "json"]).default("text"))
    .action((id: string | undefined, flags) => done(runRules(id, flags, io)));

  program
    .command("release")
    .description("return retired values to the free pool")
    .argument("<plan>", "plan file")
    .argument("[names...]", "former holders: group paths, node or anycast names, SID keys")
    .option("--all", "release every retired value")
    .option("--lock <file>", "lock file")
    .action(async (plan: string, names: string[], flags) => done(await runRelease(plan, names, flags, io)));

  program
    .command("diff")
    .description("show what moves between two SID tables (plans with their locks, or CSV/JSON tables) before rollout")
    .argument("<old>", "the table in use: a plan (YAML/JSON) or a SID table (.csv, or .json in the sid-table format)")
    .argument("<new>", "the proposed table, in any of the same forms")
    .option("--old-lock <file>", "lock file of the old plan (default: <plan>.lock.json beside it)")
    .option("--new-lock <file>", "lock file of the new plan (default: <plan>.lock.json beside it)")
    .addOption(new Option("--format <format>", "output format").choices(["text", "json"]).default("text"))
    .option("--accept-disruption", "exit 0 even when SIDs or locators are removed, renumbered or changed (the report is the same)")
    .action((oldInput: string, newInput: string, flags) => done(runDiff(oldInput, newInput, flags, io)));

  return program;
}
