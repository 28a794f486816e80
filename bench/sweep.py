"""The overlap/containment job of the benchmark in Python 3's standard ipaddress module.

Reads lines "OWNER KIND PREFIX" (KIND L for a locator, S for a SID written as /128), sorts them by first address
and then by length (a supernet before its subnets), and sweeps once with a stack of the open
locators. Counts (a) pairs of locators of different owners where one contains the other, and
(b) SIDs that lie in no locator of their own owner. Prints one JSON line with the counts and the
seconds spent parsing, sorting and sweeping (file reading excluded).

The same job is done by bench/sweep.mjs (typed arrays, a BigInt reference and a naive O(n^2)
reference); the benchmark checks that all of them agree.

Usage: python3 bench/sweep.py PREFIXES.txt
"""
import ipaddress
import json
import sys
import time


def main(path):
    with open(path, encoding="utf-8") as f:
        lines = f.read().split("\n")
    t0 = time.perf_counter()
    items = []
    for line in lines:
        if not line:
            continue
        owner, kind, text = line.split(" ", 2)
        net = ipaddress.IPv6Network(text, strict=False)
        items.append((net.network_address, net.prefixlen, owner, kind == "S", net))
    t1 = time.perf_counter()
    items.sort(key=lambda x: (x[0], x[1]))
    t2 = time.perf_counter()
    overlaps = 0
    outside = 0
    stack = []  # open locators: (last address, owner)
    for first, _plen, owner, is_sid, net in items:
        while stack and stack[-1][0] < first:
            stack.pop()
        if is_sid:
            if not any(o == owner for _, o in stack):
                outside += 1
        else:
            for _, o in stack:
                if o != owner:
                    overlaps += 1
            stack.append((net.broadcast_address, owner))
    t3 = time.perf_counter()
    print(json.dumps({"items": len(items), "overlaps": overlaps, "outside": outside, "parse_s": t1 - t0, "sort_s": t2 - t1, "sweep_s": t3 - t2, "total_s": t3 - t0}))


if __name__ == "__main__":
    main(sys.argv[1])
