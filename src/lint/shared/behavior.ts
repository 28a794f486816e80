/** Which SIDs of the packed table perform a given behaviour, for the completeness rules. */
import { classifyCodepoint } from "../../sid/behaviors.js";
import type { PackedSidTable } from "../../sid/packed.js";

/**
 * Which of `names` SID i performs, in any flavour: the first name in the list that is its
 * behaviour name, or the behaviour its codepoint stands for (when the name is not ours); -1 for
 * none. Answers are kept per behaviour id and per codepoint, so a loop over every SID classifies
 * each distinct value once.
 */
export function behaviorOf(t: PackedSidTable, names: readonly string[]): (i: number) => number {
  const byName = t.behaviors.map((b) => names.indexOf(b));
  const byCodepoint = new Int16Array(0x10000).fill(-2); // -2: not classified yet
  return (i) => {
    const n = byName[t.behavior[i]!]!;
    if (n === 0) return 0; // nothing comes before the first name
    const cp = t.codepoint[i]!;
    if (!Number.isInteger(cp) || cp < 0 || cp > 0xffff) return n; // NaN: no codepoint
    let c = byCodepoint[cp]!;
    if (c === -2) {
      const k = classifyCodepoint(cp);
      c = byCodepoint[cp] = k.kind === "behavior" ? names.indexOf(k.behavior) : -1;
    }
    return n < 0 ? c : c < 0 ? n : Math.min(n, c);
  };
}

/** True when SID i is a `name` SID, in any flavour (see behaviorOf). */
export function behaviorTest(t: PackedSidTable, name: string): (i: number) => boolean {
  const of = behaviorOf(t, [name]);
  return (i) => of(i) === 0;
}
