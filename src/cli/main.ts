#!/usr/bin/env node
/**
 * The sidcarve command line: wires commander to the library, and is the only place that touches
 * the process (arguments, streams, exit code).
 */
import { CommanderError } from "commander";
import { formatDiagnostic } from "../plan/diagnostic.js";
import { UsageError } from "./io.js";
import { buildProgram } from "./program.js";

/** Exit codes: 0 clean, 1 findings at error level (or a refused diff), 2 bad usage or unreadable input. */
export const EXIT = { ok: 0, findings: 1, usage: 2 } as const;

// A closed pipe (e.g. `sidcarve emit ... | head`) is not an error worth a stack trace.
for (const stream of [process.stdout, process.stderr]) {
  stream.on("error", (e: NodeJS.ErrnoException) => {
    if (e.code === "EPIPE") process.exit(process.exitCode ?? 0);
    throw e;
  });
}

/** Resolves when `stream` wants more (at once when it does already), or when it closes or fails. */
function drained(stream: NodeJS.WriteStream): Promise<void> {
  if (!stream.writableNeedDrain) return Promise.resolve();
  return new Promise((resolve) => {
    const done = () => {
      stream.off("drain", done);
      stream.off("close", done);
      stream.off("error", done);
      resolve();
    };
    stream.on("drain", done);
    stream.on("close", done);
    stream.on("error", done);
  });
}

async function main(argv: string[]): Promise<number> {
  const program = buildProgram({
    out: (s) => process.stdout.write(s),
    drained: () => drained(process.stdout),
    err: (s) => process.stderr.write(s),
    isTty: Boolean(process.stdout.isTTY) && !process.env.NO_COLOR,
    now: new Date(),
  });
  try {
    await program.parseAsync(argv);
    return program.exitCode ?? 0;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === "commander.helpDisplayed" || e.code === "commander.version" || e.code === "commander.help") return 0;
      return EXIT.usage;
    }
    if (e instanceof UsageError) {
      for (const d of e.diagnostics) process.stderr.write(formatDiagnostic(d) + "\n");
      process.stderr.write(`sidcarve: ${e.message}\n`);
      return EXIT.usage;
    }
    const err = e as NodeJS.ErrnoException;
    if (err && typeof err.code === "string" && err.syscall) {
      process.stderr.write(`sidcarve: ${err.path ?? ""}: ${err.code} (${err.syscall})\n`);
      return EXIT.usage;
    }
    process.stderr.write(`sidcarve: internal error: ${(e as Error)?.message ?? String(e)}\nPlease report this with the input that caused it.\n`);
    return 70;
  }
}

main(process.argv).then(
  (code) => {
    process.exitCode = code;
  },
  () => {
    process.exitCode = 70;
  },
);
