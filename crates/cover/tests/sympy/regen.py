#!/usr/bin/env python3
"""Regenerates tests/sympy/sopform.json: random incompletely specified functions
(fixed seed) minimised by sympy.logic.SOPform, for the cross-check in tests/sympy.rs.

sympy's SOPform generates the prime implicants (Quine-McCluskey), applies row and
column dominance, and on a cyclic core picks the prime covering most minterms, so
its cube count is an upper bound on the minimum (not always the minimum). The Rust
test asserts that our exact cover never has more cubes, and, when the counts are
equal, never more literals.

Run from the repository root:  python3 crates/cover/tests/sympy/regen.py
"""
import json
import os
import random

import sympy
from sympy import symbols
from sympy.logic import SOPform
from sympy.logic.boolalg import And, Not, Or

SEED = 20260406
CASES = 60


def cube_of(term, names):
    """One product (And / Symbol / Not) as a cube string over `names`."""
    lits = term.args if isinstance(term, And) else (term,)
    cube = ["-"] * len(names)
    for lit in lits:
        if isinstance(lit, Not):
            cube[names.index(str(lit.args[0]))] = "0"
        else:
            cube[names.index(str(lit))] = "1"
    return "".join(cube)


def main():
    rng = random.Random(SEED)
    cases = []
    for _ in range(CASES):
        n = rng.randint(3, 8)
        names = [chr(ord("a") + i) for i in range(n)]
        syms = symbols(" ".join(names))
        if n == 1:
            syms = (syms,)
        p_on = rng.choice([0.2, 0.35, 0.5])
        p_dc = rng.choice([0.0, 0.1, 0.2])
        on, dc = [], []
        for m in range(1 << n):
            x = rng.random()
            if x < p_on:
                on.append(m)
            elif x < p_on + p_dc:
                dc.append(m)
        if not on:
            on.append(rng.randrange(1 << n))
            dc = [d for d in dc if d not in on]
        expr = SOPform(list(syms), on, dc)
        if expr is sympy.true:
            cubes = ["-" * n]
        else:
            terms = expr.args if isinstance(expr, Or) else (expr,)
            cubes = sorted(cube_of(t, names) for t in terms)
        cases.append(
            {
                "nvars": n,
                "on": on,
                "dc": dc,
                "sympy_cubes": cubes,
                "cube_count": len(cubes),
                "literal_count": sum(len(c) - c.count("-") for c in cubes),
            }
        )
    out = {
        "generator": "crates/cover/tests/sympy/regen.py",
        "sympy_version": sympy.__version__,
        "seed": SEED,
        "cases": cases,
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "sopform.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {len(cases)} cases to {path} (sympy {sympy.__version__})")


if __name__ == "__main__":
    main()
