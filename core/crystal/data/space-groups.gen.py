#!/usr/bin/python3
"""Generates space-groups.ts (beside this script) from Debian's python3-gemmi.

Run from the repository root:
    /usr/bin/python3 core/crystal/data/space-groups.gen.py

For each of gemmi's space-group settings it stores the setting's symbols, its
crystal system and Laue class, a small generating set of the operations and the
centring translations. The generators are picked greedily from gemmi's own list
of coset representatives (in gemmi's order): an operation is kept when it is not
yet in the group the ones kept so far generate together with the centring
translations. The script then checks that the closure of what it stores equals
gemmi's full operation list (as a set of triplets) for every setting, and
refuses to write the file otherwise.
"""
import os
import sys
from fractions import Fraction

import gemmi

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'space-groups.ts')
IDENTITY = gemmi.Op('x,y,z')


def closure(ops):
    """All products of `ops` (gemmi.Op, wrapped into [0,1)), as a dict triplet -> Op."""
    group = {IDENTITY.triplet(): IDENTITY}
    frontier = [IDENTITY]
    while frontier:
        nxt = []
        for a in frontier:
            for g in ops:
                c = (g * a).wrap()
                t = c.triplet()
                if t not in group:
                    group[t] = c
                    nxt.append(c)
        frontier = nxt
        if len(group) > 192:
            raise RuntimeError('closure exceeded 192 operations')
    return group


def centring_ops(group_ops):
    return [gemmi.Op('x,y,z').translated(c) for c in group_ops.cen_ops if any(c)]


def short_symbol(sg):
    name = sg.short_name()
    # gemmi writes rhombohedral groups in hexagonal axes as 'H3', 'H-3m'; keep the H-M letter R.
    if sg.ext == 'H' and name.startswith('H'):
        name = 'R' + name[1:]
    return name


def ts_string(s):
    return "'" + s.replace('\\', '\\\\').replace("'", "\\'") + "'"


def main():
    table = list(gemmi.spacegroup_table())
    rows = []
    for sg in table:
        group_ops = sg.operations()
        full = {op.triplet() for op in group_ops}
        cens = centring_ops(group_ops)
        gens = []
        have = set(closure(cens).keys())
        for op in group_ops.sym_ops:
            if op.triplet() not in have:
                gens.append(op)
                have = set(closure(gens + cens).keys())
        if have != full:
            sys.exit(f'closure of the generators of {sg.xhm()} differs from gemmi\'s list')
        ext = sg.ext if sg.ext not in ('\x00', '') else ''
        rows.append([
            str(sg.number),
            ts_string(sg.xhm()),
            ts_string(short_symbol(sg)),
            ts_string(sg.hall),
            ts_string(sg.crystal_system_str()),
            ts_string(sg.laue_str()),
            ts_string(sg.hm[0]),
            ts_string(';'.join(op.triplet() for op in gens)),
            ts_string(';'.join(','.join(frac(c) for c in cen.tran) for cen in cens)),
        ])
        assert ext == (sg.xhm().split(':')[1] if ':' in sg.xhm() else '')
    # Default setting for each number, as gemmi's find_spacegroup_by_number gives it: check it is the
    # first row of that number, which is what the TypeScript lookup assumes.
    for n in range(1, 231):
        first = next(sg for sg in table if sg.number == n)
        if gemmi.find_spacegroup_by_number(n).xhm() != first.xhm():
            sys.exit(f'default setting of {n} is not the first in the table')
    lines = [
        '// GENERATED FILE: do not edit by hand.',
        f'// Source: the space-group settings of gemmi {gemmi.__version__} (python3-gemmi, Debian), i.e. the',
        '// tables of International Tables for Crystallography Vol. A/B as carried by gemmi:',
        f'// {len(rows)} settings. Per setting: number, extended Hermann-Mauguin symbol (gemmi xHM),',
        '// short symbol, Hall symbol, crystal system, Laue class, lattice letter, a generating set',
        "// of operations (';'-separated triplets, picked greedily from gemmi's list) and the",
        "// centring translations (';'-separated 'u,v,w'). The full operation list is their closure.",
        '// Regenerate: /usr/bin/python3 core/crystal/data/space-groups.gen.py',
        '',
        '/** number, xHM, short, Hall, crystal system, Laue class, lattice letter, generators, centring vectors */',
        'export type SpaceGroupRecord = readonly [',
        '  number: number,',
        '  xhm: string,',
        '  short: string,',
        '  hall: string,',
        '  crystalSystem: string,',
        '  laue: string,',
        '  lattice: string,',
        '  generators: string,',
        '  centring: string,',
        '];',
        '',
        f"export const GEMMI_VERSION = '{gemmi.__version__}';",
        '',
        'export const SPACE_GROUP_RECORDS: readonly SpaceGroupRecord[] = [',
    ]
    for r in rows:
        lines.append('  [' + ', '.join(r) + '],')
    lines.append('];')
    lines.append('')
    with open(OUT, 'w') as f:
        f.write('\n'.join(lines))
    print(f'wrote {OUT}: {len(rows)} settings')


def frac(c):
    """A translation component in gemmi's units of 1/24 as '0', '1/2', '2/3', ..."""
    q = Fraction(c, 24)
    return str(q) if q.denominator != 1 else str(q.numerator)


if __name__ == '__main__':
    main()
