#!/usr/bin/env python3
"""Where the phone app's WebAssembly bytes go, by crate and by function.

Usage: scripts/wasm-breakdown.sh builds the module this reads; then
    python3 scripts/wasm-breakdown.py target/breakdown/tapline-app_bg.wasm [TOP]

It walks the module's sections, takes each function body's size from the code section and its
name from the "name" custom section, and sums by crate. A generic function instantiated for the
app's own types (a closure, an iterator adapter, a drop) is counted under the crate that defines
the generic code, so "core" holds mostly code the app's closures and types made, and "libcore"
only the standard library's own non-generic functions. TOP (default 40) lists the largest
functions.
"""
import collections
import re
import subprocess
import sys


def brotli(b):
    """The size of b compressed as the size check does (brotli -q 11)."""
    return len(subprocess.run(["brotli", "-q", "11", "-c"], input=b, capture_output=True, check=True).stdout)


def leb(b, i):
    """Reads an unsigned LEB128 number at i; returns it and the position after it."""
    r = s = 0
    while True:
        x = b[i]
        i += 1
        r |= (x & 0x7F) << s
        s += 7
        if x < 0x80:
            return r, i


def walk(data):
    """Returns the number of imported functions, the function bodies, the function names and the
    data segments' bytes."""
    i = 8
    imported = 0
    bodies, names, constants = [], {}, b""
    while i < len(data):
        sid = data[i]
        i += 1
        size, i = leb(data, i)
        end = i + size
        if sid == 2:  # imports: function imports come before the module's own functions
            n, j = leb(data, i)
            for _ in range(n):
                for _ in range(2):  # module and field names
                    l, j = leb(data, j)
                    j += l
                kind = data[j]
                j += 1
                if kind == 0:
                    _, j = leb(data, j)
                    imported += 1
                elif kind == 1:  # table: element type and limits
                    j += 1
                    flag = data[j]
                    j += 1
                    _, j = leb(data, j)
                    if flag & 1:
                        _, j = leb(data, j)
                elif kind == 2:  # memory: limits
                    flag = data[j]
                    j += 1
                    _, j = leb(data, j)
                    if flag & 1:
                        _, j = leb(data, j)
                elif kind == 3:  # global: type and mutability
                    j += 2
        elif sid == 10:  # code
            n, j = leb(data, i)
            for _ in range(n):
                l, k = leb(data, j)
                bodies.append(data[j : k + l])
                j = k + l
        elif sid == 11:  # data
            constants = data[i:end]
        elif sid == 0:  # custom: only "name" matters here
            l, j = leb(data, i)
            if data[j : j + l] == b"name":
                j += l
                while j < end:
                    sub = data[j]
                    j += 1
                    ssize, j = leb(data, j)
                    if sub == 1:  # function names
                        n, k = leb(data, j)
                        for _ in range(n):
                            idx, k = leb(data, k)
                            l2, k = leb(data, k)
                            names[idx] = data[k : k + l2].decode("utf8", "replace")
                            k += l2
                    j += ssize
        i = end
    return imported, bodies, names, constants


CRATE = re.compile(r"([a-z_][a-z0-9_]*)(\[[0-9a-f]+\])?::")


def crate_of(name):
    """The crate whose code this is: the first path segment, with the standard library's own
    (non-generic, hash-tagged) functions told apart from generic code instantiated for the app."""
    m = CRATE.search(name)
    if not m:
        return "(unnamed)"
    crate, tagged = m.group(1), m.group(2)
    if crate == "core" and tagged:
        return "libcore"
    return crate


def main():
    data = open(sys.argv[1], "rb").read()
    top = int(sys.argv[2]) if len(sys.argv) > 2 else 40
    imported, bodies, names, constants = walk(data)
    if not names:
        sys.exit("wasm-breakdown: the module has no name section; build it with scripts/wasm-breakdown.sh")
    size, count = collections.Counter(), collections.Counter()
    code = collections.defaultdict(list)
    rows = []
    for k, body in enumerate(bodies):
        n = names.get(k + imported, "?")
        c = crate_of(n)
        size[c] += len(body)
        count[c] += 1
        code[c].append(body)
        rows.append((len(body), n))
    # Brotli finds repeats within a crate's code (the copies of one generic function), so the
    # compressed column says what each crate costs a download better than the raw one. Each crate
    # is compressed on its own, so the column sums to more than the whole module compresses to.
    print(f"{'crate':24s} {'bytes':>9s} {'brotli':>9s} {'functions':>9s}")
    for c, s in size.most_common():
        print(f"{c:24s} {s:9d} {brotli(b''.join(code[c])):9d} {count[c]:9d}")
    print(f"{'TOTAL code':24s} {sum(size.values()):9d} {brotli(b''.join(bodies)):9d} {len(bodies):9d}")
    print(f"{'constant data':24s} {len(constants):9d} {brotli(constants):9d}")
    print()
    for s, n in sorted(rows, reverse=True)[:top]:
        print(f"{s:7d} {n[:160]}")


if __name__ == "__main__":
    main()
