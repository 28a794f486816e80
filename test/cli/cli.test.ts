/**
 * Golden-style tests of the built command line (`node dist/cli/main.js`): each case records the
 * command, its exit code, stdout and stderr, in a fresh temporary folder. The CLI is built once
 * before the tests with `tsc -p tsconfig.build.json`, so they exercise what `npm install` would
 * ship; the build goes to a private dist/ folder so that a concurrent `npm run build` (or another
 * test building) can never hand these tests a half-written module.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative, resolve, sep } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { Address6 } from "ip-address";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stringify } from "yaml";
import { CAUTION } from "../../src/emit/caution.js";
import { schemaFiles } from "../../src/schemas.js";
import { planFile } from "../helpers/plans.js";

const ROOT = resolve(new URL("../../", import.meta.url).pathname);
const BUILD = mkdtempSync(join(tmpdir(), "sidcarve-cli-build-"));
const MAIN = join(BUILD, "dist", "cli", "main.js");
const METRO = join(ROOT, "sample-plans", "harbourline-metro.yaml");
/** The CSV header as the README specifies it. */
const README_HEADER = "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context";

interface Run {
  readonly args: readonly string[];
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

function cli(cwd: string, ...args: string[]): Run {
  const r = spawnSync(process.execPath, [MAIN, ...args], { cwd, encoding: "utf8", maxBuffer: 256 * 1024 * 1024, env: { ...process.env, NO_COLOR: "1" } });
  return { args, code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Expect a clean run; on failure the message shows the whole record. */
function ok(r: Run): Run {
  expect({ code: r.code, stderr: r.stderr }, JSON.stringify(r, null, 2)).toEqual({ code: 0, stderr: "" });
  return r;
}

/** Expect a usage failure: exit 2, a message, and never a stack trace. */
function usage(r: Run): Run {
  expect(r.code, JSON.stringify(r, null, 2)).toBe(2);
  expect(r.stderr.trim()).not.toBe("");
  expect(r.stderr).not.toContain("    at ");
  expect(r.stdout).not.toContain("    at ");
  return r;
}

const temps: string[] = [];
function tempDir(): string {
  const d = mkdtempSync(join(tmpdir(), "sidcarve-cli-"));
  temps.push(d);
  return d;
}

/** A temporary folder holding a copy of the metro sample (optionally edited). */
function metroIn(edit: (text: string) => string = (t) => t): { dir: string; plan: string; text: string } {
  const dir = tempDir();
  const text = edit(readFileSync(METRO, "utf8"));
  const plan = join(dir, "harbourline-metro.yaml");
  writeFileSync(plan, text);
  return { dir, plan, text };
}

const lineCol = (text: string, needle: string) => {
  const at = text.indexOf(needle);
  expect(at).toBeGreaterThanOrEqual(0);
  const before = text.slice(0, at);
  return { line: before.split("\n").length, column: at - before.lastIndexOf("\n") };
};
const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");

beforeAll(() => {
  writeFileSync(join(BUILD, "package.json"), JSON.stringify({ name: "sidcarve-cli-test-build", private: true, type: "module" }) + "\n");
  symlinkSync(join(ROOT, "node_modules"), join(BUILD, "node_modules"), "dir");
  execFileSync("npx", ["tsc", "-p", "tsconfig.build.json", "--outDir", join(BUILD, "dist")], { cwd: ROOT, stdio: "pipe" });
}, 180_000);

afterAll(() => {
  for (const d of [...temps, BUILD]) rmSync(d, { recursive: true, force: true });
});

describe("allocate", () => {
  it("writes the lock beside the plan, then reports it unchanged", () => {
    const { dir, plan } = metroIn();
    const first = ok(cli(dir, "allocate", plan));
    const lock = join(dir, "harbourline-metro.lock.json");
    expect(first.stdout).toContain(`lock written to ${lock}`);
    const text = readFileSync(lock, "utf8");
    expect(JSON.parse(text).schema).toBe("sidcarve/lock/v1");
    const second = ok(cli(dir, "allocate", plan));
    expect(second.stdout).toContain(`lock ${lock} unchanged`);
    expect(readFileSync(lock, "utf8")).toBe(text);
  });

  it("--dry-run and --lock", () => {
    const { dir, plan } = metroIn();
    expect(ok(cli(dir, "allocate", plan, "--dry-run")).stdout).toMatch(/dry run/);
    expect(existsSync(join(dir, "harbourline-metro.lock.json"))).toBe(false);
    ok(cli(dir, "allocate", plan, "--lock", "elsewhere.json"));
    expect(existsSync(join(dir, "elsewhere.json"))).toBe(true);
  });
});

describe("emit", () => {
  const nodes = planFile(METRO).nodes.map((n) => n.name);
  const ajv = new Ajv2020({ allErrors: true, strict: false });
  const validate = ajv.compile(JSON.parse(readFileSync(join(ROOT, "schemas", "sid-table.schema.json"), "utf8")));

  it("refuses to run before allocate: exit 2 and a message that says what to do", () => {
    const { dir, plan } = metroIn();
    const r = usage(cli(dir, "emit", plan, "--format", "csv"));
    expect(r.stderr).toMatch(/allocate/);
    expect(r.stdout).toBe("");
  });

  it("writes one CSV per node, with the header, the caution and the same bytes on a second run", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const out = join(dir, "tables");
    ok(cli(dir, "emit", plan, "--format", "csv", "--per-node", "--out", out));
    expect(readdirSync(out).sort()).toEqual(nodes.map((n) => `${n}.csv`).sort());
    const first = new Map(readdirSync(out).map((f) => [f, readFileSync(join(out, f))]));
    for (const [f, bytes] of first) {
      const lines = bytes.toString("utf8").split("\r\n");
      expect(lines[0]!.startsWith("# ")).toBe(true);
      expect(lines[0]).toContain(CAUTION);
      expect(lines[1]).toBe(README_HEADER);
      expect(lines.at(-1)).toBe(""); // every line ends in CRLF (RFC 4180)
      expect(lines.slice(2, -1).every((l) => l.startsWith(`${f.replace(/\.csv$/, "")},`))).toBe(true);
    }
    ok(cli(dir, "emit", plan, "--format", "csv", "--per-node", "--out", out));
    for (const [f, bytes] of first) expect(readFileSync(join(out, f)).equals(bytes), f).toBe(true);
  });

  it("writes a single JSON table that validates against schemas/sid-table.schema.json, byte-identical on a second run", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const r = ok(cli(dir, "emit", plan, "--format", "json", "--out", "out"));
    const file = join(dir, "out", "harbourline-metro.sids.json");
    expect(r.stdout).toContain(join("out", "harbourline-metro.sids.json"));
    const bytes = readFileSync(file);
    const doc = JSON.parse(bytes.toString("utf8"));
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.caution).toBe(CAUTION);
    expect(doc.nodes.map((n: { node: string }) => n.node).sort()).toEqual([...nodes].sort());
    ok(cli(dir, "emit", plan, "--format", "json", "--out", "out"));
    expect(readFileSync(file).equals(bytes)).toBe(true);
    // standard output carries the same document
    expect(ok(cli(dir, "emit", plan, "--format", "json")).stdout).toBe(bytes.toString("utf8"));
  });

  it("per-node JSON files each validate, and a single CSV holds every node's rows", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    ok(cli(dir, "emit", plan, "--format", "json", "--per-node", "--out", "j"));
    for (const f of readdirSync(join(dir, "j"))) {
      const doc = JSON.parse(readFileSync(join(dir, "j", f), "utf8"));
      expect(validate(doc), `${f}: ${JSON.stringify(validate.errors)}`).toBe(true);
      expect(doc.nodes).toHaveLength(1);
    }
    ok(cli(dir, "emit", plan, "--format", "csv", "--out", "c"));
    const csv = readFileSync(join(dir, "c", "harbourline-metro.sids.csv"), "utf8").split("\r\n");
    expect(csv[1]).toBe(README_HEADER);
    expect(new Set(csv.slice(2, -1).map((l) => l.split(",")[0]))).toEqual(new Set(nodes));
  });

  it("refuses to overwrite a file it did not write, unless --force", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const target = join(dir, "out", "harbourline-metro.sids.csv");
    ok(cli(dir, "emit", plan, "--format", "csv", "--out", "out")); // creates the folder
    writeFileSync(target, "my own notes\n");
    const r = usage(cli(dir, "emit", plan, "--format", "csv", "--out", "out"));
    expect(r.stderr).toContain("--force");
    expect(readFileSync(target, "utf8")).toBe("my own notes\n");
    ok(cli(dir, "emit", plan, "--format", "csv", "--out", "out", "--force"));
    expect(readFileSync(target, "utf8").startsWith("# ")).toBe(true);
  });

  it("a node named ../evil cannot write outside --out", () => {
    const dir = tempDir();
    const plan = join(dir, "evil.yaml");
    writeFileSync(
      plan,
      stringify({
        sidcarve: 1,
        plan: "../../evil-plan",
        levels: [{ name: "router", bits: 16 }],
        blocks: [{ name: "b", prefix: "2001:db8:e0::/48", structure: { node: 16, function: 16 } }],
        nodes: [{ name: "../evil" }, { name: "..", value: 9 }, { name: "good" }],
        links: [{ ends: ["../evil", "good"] }],
      }),
    );
    ok(cli(dir, "allocate", plan));
    const out = join(dir, "nested", "out");
    ok(cli(dir, "emit", plan, "--format", "csv", "--per-node", "--out", out));
    ok(cli(dir, "emit", plan, "--format", "json", "--out", out));
    const written = readdirSync(out);
    expect(written).toHaveLength(4);
    for (const f of written) {
      expect(f).not.toMatch(/[/\\]/);
      expect(f.startsWith(".")).toBe(false);
      expect(relative(out, resolve(out, f)).split(sep)[0]).not.toBe("..");
    }
    expect(readdirSync(dir).sort()).toEqual(["evil.lock.json", "evil.yaml", "nested"]);
    expect(readdirSync(join(dir, "nested"))).toEqual(["out"]);
    // the rows still name the node as the plan does
    const evil = written.find((f) => f.endsWith(".csv") && readFileSync(join(out, f), "utf8").includes("\r\n../evil,"));
    expect(evil).toBeDefined();
  });
});

describe("bad input", () => {
  it("a bad plan: exit 2, file:line:col with the plan path and code, no stack trace", () => {
    const { dir, plan, text } = metroIn((t) => t.replace("prefix: 5f00:0:4800::/48", "prefix: 5f00:0:4800::1/48"));
    const r = usage(cli(dir, "allocate", plan));
    const { line, column } = lineCol(text, "5f00:0:4800::1/48");
    expect(r.stderr).toMatch(new RegExp(`^${escape(plan)}:${line}:${column} \\(blocks\\[0\\]\\.prefix\\): .*\\[plan/host-bits\\]$`, "m"));
    expect(existsSync(join(dir, "harbourline-metro.lock.json"))).toBe(false);
  });

  it("a YAML syntax error: exit 2 with its line", () => {
    const { dir, plan, text } = metroIn((t) => t.replace("  - { name: oldquay-pe1, place: brackwater/oldquay, role: pe }", "  - { name: oldquay-pe1, place: brackwater/oldquay, role: @pe }"));
    const r = usage(cli(dir, "emit", plan));
    expect(r.stderr).toMatch(new RegExp(`^${escape(plan)}:${lineCol(text, "@pe").line}:\\d+: .*\\[yaml/syntax\\]$`, "m"));
  });

  it("a missing plan file: exit 2", () => {
    const dir = tempDir();
    expect(usage(cli(dir, "allocate", "nope.yaml")).stderr).toMatch(/nope\.yaml/);
  });

  it("an unknown option or command: exit 2", () => {
    const { dir, plan } = metroIn();
    usage(cli(dir, "allocate", plan, "--no-such-option"));
    usage(cli(dir, "emit", plan, "--format", "xml"));
    usage(cli(dir, "carve", plan));
  });

  it("a damaged lock: exit 2 and nothing written", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const lock = join(dir, "harbourline-metro.lock.json");
    const damaged = readFileSync(lock, "utf8").replace(/"0x1"/, '"0x2"');
    writeFileSync(lock, damaged);
    expect(usage(cli(dir, "allocate", plan)).stderr).toMatch(/lock\/digest/);
    expect(readFileSync(lock, "utf8")).toBe(damaged);
  });
});

describe("decode", () => {
  it("prints the behaviour, node and context of a SID taken from the emitted table", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const doc = JSON.parse(ok(cli(dir, "emit", plan, "--format", "json")).stdout);
    const pick = (behavior: string) => {
      for (const n of doc.nodes) for (const s of n.sids) if (s.behavior === behavior) return { node: n.node as string, sid: s.sid as string, context: s.context as Record<string, string> };
      throw new Error(`no ${behavior}`);
    };
    const dt4 = pick("End.DT4");
    const text = ok(cli(dir, "decode", dt4.sid, "--plan", plan)).stdout;
    expect(text).toContain("End.DT4");
    expect(text).toContain("codepoint 19"); // IANA: End.DT4
    expect(text).toContain(dt4.node);
    expect(text).toContain(`vrf=${dt4.context.vrf}`);
    const endx = pick("End.X");
    const json = JSON.parse(ok(cli(dir, "decode", endx.sid, "2001:db8::1", "--plan", plan, "--format", "json")).stdout);
    expect(json).toHaveLength(2);
    expect(json[0].sid.behavior).toBe("End.X");
    expect(json[0].owners).toEqual([endx.node]);
    expect(json[1].block).toBeUndefined();
  });

  it("reads End.DT2M's argument as the 16-bit field its structure declares (backbone sample)", () => {
    const dir = tempDir();
    const plan = join(dir, "tessaline-backbone.yaml");
    writeFileSync(plan, readFileSync(join(ROOT, "sample-plans", "tessaline-backbone.yaml")));
    ok(cli(dir, "allocate", plan));
    const doc = JSON.parse(ok(cli(dir, "emit", plan, "--format", "json")).stdout);
    const dt2m = doc.nodes.flatMap((n: { sids: { behavior: string; sid: string; structure: { block: number; node: number; function: number; argument: number } }[] }) => n.sids).find((s: { behavior: string }) => s.behavior === "End.DT2M");
    const st = dt2m.structure;
    expect(st.argument).toBe(16);
    // Arg.FE2 = 7 in the argument field (RFC 8986 §4.12), computed with ip-address
    const shift = BigInt(128 - st.block - st.node - st.function - st.argument);
    const withArg = Address6.fromBigInt(new Address6(dt2m.sid).bigInt() + (7n << shift)).correctForm();
    const text = ok(cli(dir, "decode", withArg, "--plan", plan)).stdout;
    expect(text).toMatch(/^\s+argument\s+0x7$/m);
    expect(text).toContain("End.DT2M");
  });

  it("refuses an address that is not IPv6: exit 2", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    expect(usage(cli(dir, "decode", "192.0.2.1", "--plan", plan)).stderr).toMatch(/IPv4/);
  });
});

describe("release", () => {
  it("frees the values of a removed node, and says so when nothing is left", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const lock = join(dir, "harbourline-metro.lock.json");
    // remove a PE (and the spur link that named it)
    const shrunk = readFileSync(plan, "utf8")
      .replace("  - { name: oldquay-pe2, place: brackwater/oldquay, role: pe }\n", "")
      .replace("  - { ends: [oldquay-pe2, oldquay-p1] }\n", "")
      .replace("pes: [oldquay-pe2, lanterns-pe2]", "pes: [lanterns-pe2]");
    writeFileSync(plan, shrunk);
    ok(cli(dir, "allocate", plan));
    const retired = JSON.parse(readFileSync(lock, "utf8")).retired as { kind: string; was: string }[];
    expect(retired.some((r) => r.kind === "node" && r.was === "oldquay-pe2")).toBe(true);
    const r = ok(cli(dir, "release", plan, "oldquay-pe2"));
    expect(r.stdout).toMatch(/released node value/);
    const after = JSON.parse(readFileSync(lock, "utf8")).retired as { kind: string; was: string }[];
    expect(after.some((x) => x.was === "oldquay-pe2")).toBe(false);
    expect(after.length).toBe(retired.length - retired.filter((x) => x.was === "oldquay-pe2").length);
    ok(cli(dir, "release", plan, "--all"));
    expect(JSON.parse(readFileSync(lock, "utf8")).retired).toEqual([]);
    expect(ok(cli(dir, "release", plan, "--all")).stdout).toMatch(/nothing released/);
  });

  it("needs names or --all: exit 2", () => {
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    usage(cli(dir, "release", plan));
  });
});

describe("published schemas", () => {
  it("schemas/*.schema.json equal the objects in src/schemas.ts (npm run schemas was run)", () => {
    const onDisk = readdirSync(join(ROOT, "schemas")).filter((f) => f.endsWith(".schema.json")).sort();
    expect(onDisk).toEqual(Object.keys(schemaFiles).sort());
    for (const [file, schema] of Object.entries(schemaFiles)) {
      expect(JSON.parse(readFileSync(join(ROOT, "schemas", file), "utf8")), file).toEqual(JSON.parse(JSON.stringify(schema)));
    }
  });
});

describe("plan and lock read together (a large lock is read in a worker thread while the plan loads)", () => {
  // the built modules: a worker thread runs the built JavaScript, not the TypeScript sources
  const built = async () => ({
    files: (await import(join(BUILD, "dist", "cli", "plan-files.js"))) as typeof import("../../src/cli/plan-files.js"),
    lock: (await import(join(BUILD, "dist", "alloc", "lock.js"))) as typeof import("../../src/alloc/lock.js"),
    fast: (await import(join(BUILD, "dist", "alloc", "lock-fast.js"))) as typeof import("../../src/alloc/lock-fast.js"),
  });

  it("the worker's lock is the one the fast reader gives on this thread", async () => {
    const { files, lock, fast } = await built();
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const bytes = readFileSync(join(dir, "harbourline-metro.lock.json"));
    const shared = Buffer.from(new SharedArrayBuffer(bytes.length));
    bytes.copy(shared);
    const w = files.readLockInWorker(shared);
    const got = await w.lock;
    w.stop();
    expect(got?.lock).toBeDefined();
    expect(lock.serializeLock(got!.lock!)).toBe(lock.serializeLock(fast.readLockFast(bytes)!));
    expect(lock.serializeLock(got!.lock!)).toBe(bytes.toString("utf8"));
    // bytes the fast reader is not sure of: the worker says so (the caller reads them the readable way)
    const edited = Buffer.from(new SharedArrayBuffer(bytes.length));
    Buffer.from(bytes.toString("latin1").replace('"0x1"', '"0x2"'), "latin1").copy(edited);
    const w2 = files.readLockInWorker(edited);
    expect(await w2.lock).toEqual({ lock: undefined });
    w2.stop();
  });

  it("reads the same lock with the worker as without, and refuses a damaged one the same way", async () => {
    const { files, lock } = await built();
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const lockFile = join(dir, "harbourline-metro.lock.json");
    const withWorker = await files.loadPlanAndLock(plan, lockFile, 0);
    const without = await files.loadPlanAndLock(plan, lockFile, Infinity);
    expect(withWorker.lock).toBeDefined();
    expect(lock.serializeLock(withWorker.lock!)).toBe(lock.serializeLock(without.lock!));
    expect(withWorker.bytes?.equals(readFileSync(lockFile))).toBe(true);
    // one value changed by hand: the digest no longer matches, with or without the worker
    writeFileSync(lockFile, readFileSync(lockFile, "utf8").replace(/"0x1"/, '"0x2"'));
    const refusal = async (workerBytes: number) =>
      files.loadPlanAndLock(plan, lockFile, workerBytes).then(
        () => "read",
        (e: { diagnostics?: readonly { code: string }[] }) => (e.diagnostics ?? []).map((d) => d.code).join(","),
      );
    expect(await refusal(0)).toBe("lock/digest");
    expect(await refusal(Infinity)).toBe("lock/digest");
  });

  it("reads the lock on this thread when the worker cannot start (run from the TypeScript sources, there is no worker script)", async () => {
    const { lock } = await built();
    const sources = await import("../../src/cli/plan-files.js");
    const { dir, plan } = metroIn();
    ok(cli(dir, "allocate", plan));
    const lockFile = join(dir, "harbourline-metro.lock.json");
    const bytes = readFileSync(lockFile);
    const shared = Buffer.from(new SharedArrayBuffer(bytes.length));
    bytes.copy(shared);
    const w = sources.readLockInWorker(shared);
    expect(await w.lock).toBeUndefined();
    w.stop();
    const fallback = await sources.loadPlanAndLock(plan, lockFile, 0);
    expect(lock.serializeLock(fallback.lock!)).toBe(bytes.toString("utf8"));
  });

  it("reports a broken plan before a lock that cannot be read, as the plain reading does", async () => {
    const { files } = await built();
    const { dir, plan } = metroIn((t) => t.replace(/^plan: .*$/m, "plan: 12"));
    const lockFolder = join(dir, "folder.lock.json");
    mkdirSync(lockFolder);
    const message = await files.loadPlanAndLock(plan, lockFolder, 0).then(
      () => "read",
      (e: Error) => e.message,
    );
    expect(message).toContain("the plan has");
    const { plan: good } = metroIn();
    const unreadable = await files.loadPlanAndLock(good, lockFolder, 0).then(
      () => "read",
      (e: Error) => e.message,
    );
    expect(unreadable).toBe(`${lockFolder}: cannot be read (EISDIR)`);
  });
});
