/**
 * # Phase description: Annula's small JSON format for a crystalline phase
 *
 * A phase description is one JSON object. Example (gold):
 *
 * ```json
 * {
 *   "id": "Au",
 *   "name": "gold",
 *   "formula": "Au",
 *   "structureType": "fcc",
 *   "spaceGroup": "Fm-3m",
 *   "cell": { "a": 4.0782 },
 *   "sites": [ { "element": "Au", "xyz": [0, 0, 0], "B": 0.6 } ],
 *   "source": "where the lattice constant comes from (a full citation)",
 *   "temperatureK": 298
 * }
 * ```
 *
 * Fields (unknown fields are an error, so a misspelt one is never ignored):
 *
 * | field | required | meaning |
 * | --- | --- | --- |
 * | `id` | yes | short name for the command line: letters, digits and `_ - . + ( )`, at most 40 characters, starting with a letter or digit |
 * | `name` | yes | human name, e.g. "gold" |
 * | `formula` | yes | formula unit, e.g. "MgAl2O4" |
 * | `structureType` | no | label such as "fcc", "rock salt", "spinel" (default "") |
 * | `spaceGroup` | yes | Hermann-Mauguin symbol ("Fm-3m", "F m -3 m", "P6_3/mmc", "Fd-3m:2" for origin choice 2, "R-3c:H"), International Tables number (225), or Hall symbol ("-F 4 2 3"). Without a suffix, groups with two origin choices take origin choice 1 and rhombohedral groups hexagonal axes (the convention of International Tables' first-listed setting); the sites must use the setting named |
 * | `cell` | yes | lengths in Å and angles in degrees, only those the crystal system leaves free (below); others may be repeated if they agree |
 * | `sites` | yes | the asymmetric unit, one entry per site (below), at least one |
 * | `source` | yes | citation of the lattice constant and structure |
 * | `temperatureK` | no | temperature the lattice constant refers to, K |
 *
 * Cell by crystal system of the space group (International Tables Vol. A, Table 2.1.2.1):
 *
 * | system | give | implied |
 * | --- | --- | --- |
 * | cubic | `a` | b = c = a, all angles 90 |
 * | tetragonal | `a`, `c` | b = a, all angles 90 |
 * | orthorhombic | `a`, `b`, `c` | all angles 90 |
 * | hexagonal, trigonal (hexagonal axes) | `a`, `c` | b = a, alpha = beta = 90, gamma = 120 |
 * | trigonal on rhombohedral axes (symbol ending ":R") | `a`, `alpha` | b = c = a, beta = gamma = alpha |
 * | monoclinic | `a`, `b`, `c` and the angle about the unique axis (`beta` for "P 1 21/c 1", `gamma` for "P 1 1 21/b") | the other two angles 90 |
 * | triclinic | all six | - |
 *
 * A cell that contradicts its space group (a `c` different from `a` for a cubic
 * group, gamma = 90 for a hexagonal one) is an error.
 *
 * A site:
 *
 * | field | required | meaning |
 * | --- | --- | --- |
 * | `element` | yes | element symbol; a charge is allowed and ignored ("O2-", "Fe3+") |
 * | `xyz` | yes | fractional coordinates, numbers or fractions as strings: `[0, 0, 0]`, `["1/3", "2/3", 0.25]` |
 * | `label` | no | site name (default element + running number, "O1", "O2"); unique in the phase |
 * | `occupancy` | no | 0 < occupancy <= 1, default 1 (chemical occupancy, not divided by the site multiplicity) |
 * | `B` | no | isotropic displacement parameter B, Å^2, >= 0 |
 * | `Uiso` | no | isotropic U, Å^2, >= 0 (B = 8 pi^2 U); give B or Uiso, not both; with neither, B = 0.5 Å^2 (DEFAULT_B_ISO_A2) |
 *
 * Errors name the source, the field path (`sites[1].xyz`) and what was expected.
 */

import { z } from 'zod';
import { cellRuleFor, completeCell } from './cell-constraints';
import { bIsoFromUIsoA2, DEFAULT_B_ISO_A2 } from './displacement-parameters';
import { atomicNumber, elementSymbol } from './elements';
import type { AtomSite, Phase, PhaseOrigin } from './phase';
import { PhaseInputError } from './phase-input-error';
import { findSpaceGroup } from './space-group';
import { prepareStructure } from './structure-factor';
import { parseSymmetryOperation } from './symmetry-operation';

const FRACTION = /^\s*([+-]?\d+)\s*\/\s*(\d+)\s*$/;
const DECIMAL = /^\s*[+-]?(\d+\.?\d*|\.\d+)\s*$/;

const unknownField = (allowed: string[]) => (issue: { code?: string; keys?: string[] }) =>
  issue.code === 'unrecognized_keys'
    ? `unknown field${issue.keys!.length > 1 ? 's' : ''} ${issue.keys!.map((k) => `"${k}"`).join(', ')}; allowed: ${allowed.join(', ')}`
    : 'expected an object';

const length = () =>
  z.number({ error: 'expected a length in Å (a number)' }).positive({ error: 'expected a positive length in Å' });
const angle = () =>
  z
    .number({ error: 'expected an angle in degrees (a number)' })
    .gt(0, { error: 'expected an angle strictly between 0 and 180 degrees' })
    .lt(180, { error: 'expected an angle strictly between 0 and 180 degrees' });

const COORDINATE_EXPECTED = 'expected a fractional coordinate: a number (0.25) or a fraction in a string ("1/3")';
const coordinate = z.union(
  [
    z.number(),
    z.string().regex(new RegExp(`${FRACTION.source}|${DECIMAL.source}`), { error: COORDINATE_EXPECTED }),
  ],
  { error: COORDINATE_EXPECTED },
);

const SITE_FIELDS = ['label', 'element', 'xyz', 'occupancy', 'B', 'Uiso'];
const siteSchema = z
  .strictObject(
    {
      label: z.string({ error: 'expected a site label (text)' }).min(1, { error: 'expected a non-empty site label' }).optional(),
      element: z.string({ error: 'expected an element symbol such as "Au" or "O2-"' }).min(1, { error: 'expected an element symbol' }),
      xyz: z.tuple([coordinate, coordinate, coordinate], { error: 'expected three fractional coordinates [x, y, z]' }),
      occupancy: z
        .number({ error: 'expected an occupancy, a number in (0, 1]' })
        .gt(0, { error: 'expected an occupancy in (0, 1]' })
        .lte(1, { error: 'expected an occupancy in (0, 1]' })
        .optional(),
      B: z.number({ error: 'expected B as a number of Å^2' }).min(0, { error: 'expected B >= 0 Å^2' }).optional(),
      Uiso: z.number({ error: 'expected Uiso as a number of Å^2' }).min(0, { error: 'expected Uiso >= 0 Å^2' }).optional(),
    },
    { error: unknownField(SITE_FIELDS) },
  )
  .refine((s) => s.B === undefined || s.Uiso === undefined, { error: 'give B or Uiso, not both', path: ['Uiso'] });

const CELL_FIELDS = ['a', 'b', 'c', 'alpha', 'beta', 'gamma'];
const PHASE_FIELDS = ['id', 'name', 'formula', 'structureType', 'spaceGroup', 'cell', 'sites', 'source', 'temperatureK'];

/** The zod schema of a phase description (the format documented at the top of this file). */
export const phaseDescriptionSchema = z.strictObject(
  {
    id: z
      .string({ error: 'expected a short id (text) such as "Au" or "MgAl2O4"' })
      .regex(/^[A-Za-z0-9][A-Za-z0-9_.+()-]{0,39}$/, {
        error: 'expected an id of at most 40 letters, digits and _ - . + ( ), starting with a letter or digit',
      }),
    name: z.string({ error: 'expected the phase name (text)' }).min(1, { error: 'expected a non-empty name' }),
    formula: z.string({ error: 'expected the formula unit (text) such as "MgAl2O4"' }).min(1, { error: 'expected a non-empty formula' }),
    structureType: z.string({ error: 'expected a structure-type label (text) such as "fcc"' }).optional(),
    spaceGroup: z.union([z.string().min(1), z.number().int()], {
      error: 'expected a space group: a Hermann-Mauguin symbol ("Fm-3m"), a number 1-230 or a Hall symbol',
    }),
    cell: z.strictObject(
      {
        a: length().optional(),
        b: length().optional(),
        c: length().optional(),
        alpha: angle().optional(),
        beta: angle().optional(),
        gamma: angle().optional(),
      },
      { error: unknownField(CELL_FIELDS) },
    ),
    sites: z
      .array(siteSchema, { error: 'expected a list of atom sites' })
      .min(1, { error: 'expected at least one atom site' }),
    source: z.string({ error: 'expected the citation of the data (text)' }).min(1, { error: 'expected a non-empty source' }),
    temperatureK: z.number({ error: 'expected a temperature in K' }).positive({ error: 'expected a positive temperature in K' }).optional(),
  },
  { error: unknownField(PHASE_FIELDS) },
);

/** A phase description as written (the input side of the schema). */
export type PhaseDescription = z.input<typeof phaseDescriptionSchema>;

/** `sites[1].xyz` from ['sites', 1, 'xyz']. */
function formatPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const p of path) out += typeof p === 'number' ? `[${p}]` : out === '' ? String(p) : `.${String(p)}`;
  return out === '' ? '(the whole description)' : out;
}

function shortJson(value: unknown): string {
  const text = JSON.stringify(value);
  if (text === undefined) return String(value);
  return text.length > 40 ? `${text.slice(0, 37)}...` : text;
}

function toNumber(c: number | string): number {
  if (typeof c === 'number') return c;
  const f = FRACTION.exec(c);
  return f ? Number(f[1]) / Number(f[2]) : Number(c);
}

/**
 * Builds a Phase from a description the schema has accepted; checks the space group,
 * the cell against it, the elements, the labels, and finally the whole structure
 * with prepareStructure.
 */
function buildPhase(
  d: z.output<typeof phaseDescriptionSchema>,
  origin: PhaseOrigin,
  fail: (field: string, message: string) => never,
  failWhole: (message: string) => never,
): Phase {
  const setting = findSpaceGroup(d.spaceGroup);
  if (!setting) {
    fail(
      'spaceGroup',
      `unknown space group ${shortJson(d.spaceGroup)}; give a Hermann-Mauguin symbol such as "Fm-3m" or "Fd-3m:2", ` +
        'an International Tables number 1-230, or a Hall symbol such as "-F 4 2 3"',
    );
  }
  const operations = setting!.operations.map(parseSymmetryOperation);
  let cell;
  try {
    cell = completeCell(d.cell, setting!, cellRuleFor(setting!, operations));
  } catch (e) {
    // completeCell's message starts with the field: "cell.c is missing: ...".
    failWhole((e as Error).message);
  }
  const counts = new Map<string, number>();
  const labels = new Set<string>();
  const sites: AtomSite[] = d.sites.map((s, i) => {
    let element: string;
    try {
      element = elementSymbol(atomicNumber(s.element));
    } catch (e) {
      fail(`sites[${i}].element`, (e as Error).message);
    }
    const n = (counts.get(element!) ?? 0) + 1;
    counts.set(element!, n);
    const label = s.label ?? `${element!}${n}`;
    if (labels.has(label)) fail(`sites[${i}].label`, `label "${label}" is used by an earlier site; give each site its own label`);
    labels.add(label);
    const [x, y, z] = s.xyz.map(toNumber) as [number, number, number];
    const bIsoA2 = s.B ?? (s.Uiso === undefined ? DEFAULT_B_ISO_A2 : bIsoFromUIsoA2(s.Uiso));
    return { label, element: element!, x, y, z, occupancy: s.occupancy ?? 1, bIsoA2 };
  });
  const phase: Phase = {
    id: d.id,
    name: d.name,
    formula: d.formula,
    structureType: d.structureType ?? '',
    spaceGroup: setting!.hermannMauguin,
    symmetryOperations: [...setting!.operations],
    cell: cell!,
    sites,
    source: d.source,
    origin,
  };
  if (d.temperatureK !== undefined) phase.temperatureK = d.temperatureK;
  try {
    prepareStructure(phase);
  } catch (e) {
    failWhole((e as Error).message);
  }
  return phase;
}

/**
 * Validates a phase description and turns it into a Phase.
 *
 * @param json the parsed JSON value (or the JSON text itself, which is parsed first)
 * @param sourceName the file or other source, used in error messages
 * @param origin 'json' (default); the phase library passes 'library'
 * @returns a Phase with `origin` set, the space group as its extended Hermann-Mauguin
 *   symbol ("F m -3 m", "F d -3 m:2") and its full list of operations
 * @throws PhaseInputError `phase description "<source>": <field path>: <what was expected>`
 *   for text that is not JSON, any field the schema refuses (every problem listed), an
 *   unknown space group, a cell that contradicts its space group, an unknown element, a
 *   repeated label, or a structure that cannot be prepared.
 */
export function phaseFromDescription(json: unknown, sourceName: string, origin: PhaseOrigin = 'json'): Phase {
  const prefix = `phase description "${sourceName}"`;
  const failWhole = (message: string): never => {
    throw new PhaseInputError(sourceName, `${prefix}: ${message}`);
  };
  const fail = (field: string, message: string): never => failWhole(`${field}: ${message}`);
  let value = json;
  if (typeof json === 'string') {
    try {
      value = JSON.parse(json);
    } catch (e) {
      failWhole(`not valid JSON (${(e as Error).message}); check brackets, commas and quotes`);
    }
  }
  const parsed = phaseDescriptionSchema.safeParse(value, { reportInput: true });
  if (!parsed.success) {
    const problems = parsed.error.issues.map((issue) => {
      const where = formatPath(issue.path);
      const input = (issue as { input?: unknown }).input;
      if ((issue.code === 'invalid_type' || issue.code === 'invalid_union') && input === undefined && issue.path.length > 0) {
        return `${where}: is missing (${issue.message})`;
      }
      const got = input === undefined || issue.code === 'unrecognized_keys' || issue.code === 'custom' ? '' : `; got ${shortJson(input)}`;
      return `${where}: ${issue.message}${got}`;
    });
    return failWhole(problems.join('; '));
  }
  return buildPhase(parsed.data, origin, fail, failWhole);
}
