// Runs the sidcarve CLI in this process and prints its peak resident memory to stderr as the last
// line ("maxrss-kb N"); used by bench/run.mjs when /usr/bin/time is not installed.
// Usage: node bench/with-rss.mjs ARGS...
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const main = join(fileURLToPath(new URL("..", import.meta.url)), "dist/cli/main.js");
process.argv = [process.argv[0], main, ...process.argv.slice(2)];
process.on("exit", () => process.stderr.write(`\nmaxrss-kb ${process.resourceUsage().maxRSS}\n`));
await import(main);
