/**
 * Runs a Python 3 script synchronously for cross-checks against Python's `ipaddress` module.
 * The script arrives on stdin; the input value is available to it as `INPUT` (decoded from JSON)
 * and it must print exactly one JSON document to stdout. One call = one python3 process, so a
 * test batches all its cases into a single call.
 */
import { execFileSync } from "node:child_process";

/**
 * Run `script` under `python3 -I` (isolated: no user site-packages, no PYTHON* variables) with
 * `input` bound to the Python name INPUT; returns the parsed JSON the script printed. Throws
 * (failing the test) when python3 exits non-zero or prints something that is not JSON. Pass
 * 128-bit values as decimal strings: JSON numbers cannot hold them.
 */
export function runPython<T>(script: string, input: unknown): T {
  // base64 keeps the JSON out of Python string-literal escaping entirely
  const payload = Buffer.from(JSON.stringify(input), "utf8").toString("base64");
  const program = `import base64, json\nINPUT = json.loads(base64.b64decode("${payload}").decode("utf-8"))\n${script}\n`;
  const out = execFileSync("python3", ["-I", "-"], {
    input: program,
    encoding: "utf8",
    maxBuffer: 256 * 1024 * 1024,
    stdio: ["pipe", "pipe", "pipe"],
  });
  return JSON.parse(out) as T;
}

