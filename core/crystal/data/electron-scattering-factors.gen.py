#!/usr/bin/python3
"""Generates electron-scattering-factors.ts (beside this script) from Debian's python3-gemmi.

Run from the repository root:
    /usr/bin/python3 core/crystal/data/electron-scattering-factors.gen.py

gemmi carries, as Element(z).c4322, the five-Gaussian fits of the elastic electron
scattering factors of neutral atoms of International Tables for Crystallography
Vol. C, Table 4.3.2.2 (L.-M. Peng, G. Ren, S. L. Dudarev and M. J. Whelan,
Acta Cryst. A52 (1996) 257-276), for Z = 1..98. get_coefs() returns a1..a5 (Å)
then b1..b5 (Å^2); f_e(s) = sum_i a_i exp(-b_i s^2) with s = sin(theta)/lambda.
"""
import os
import sys

import gemmi

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'electron-scattering-factors.ts')
Z_MAX = 98


def main():
    lines = [
        '// GENERATED FILE: do not edit by hand.',
        '// Elastic electron scattering factors of neutral atoms, five-Gaussian fits',
        '//   f_e(s) = sum_{i=1..5} a_i exp(-b_i s^2),  s = sin(theta)/lambda in 1/Å, f_e in Å,',
        '// fitted over 0 <= s <= 2 Å^-1: International Tables for Crystallography Vol. C,',
        '// Table 4.3.2.2 (L.-M. Peng, G. Ren, S. L. Dudarev and M. J. Whelan, Acta Cryst. A52',
        f'// (1996) 257-276), as carried by gemmi {gemmi.__version__} (python3-gemmi, Debian: Element.c4322).',
        '// Row Z-1 holds a1..a5 (Å) then b1..b5 (Å^2) for Z = 1..98.',
        '// Regenerate: /usr/bin/python3 core/crystal/data/electron-scattering-factors.gen.py',
        '',
        f"export const ELECTRON_SCATTERING_SOURCE_GEMMI_VERSION = '{gemmi.__version__}';",
        '',
        '/** Largest atomic number with tabulated coefficients (Cf). */',
        f'export const ELECTRON_SCATTERING_Z_MAX = {Z_MAX};',
        '',
        '/** a1..a5 (Å), b1..b5 (Å^2) for Z = 1..98 (index Z - 1). */',
        'export const PENG_1996_COEFFICIENTS: readonly (readonly number[])[] = [',
    ]
    for z in range(1, Z_MAX + 1):
        el = gemmi.Element(z)
        coefs = el.c4322.get_coefs()
        if len(coefs) != 10 or not any(coefs):
            sys.exit(f'gemmi has no c4322 coefficients for Z = {z}')
        lines.append('  [' + ', '.join(repr(float(c)) for c in coefs) + f'], // {z} {el.name}')
    lines.append('];')
    lines.append('')
    with open(OUT, 'w') as f:
        f.write('\n'.join(lines))
    print(f'wrote {OUT}: Z = 1..{Z_MAX}')


if __name__ == '__main__':
    main()
