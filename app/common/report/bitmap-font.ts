/**
 * A small bitmap font for labels drawn into the pattern image (hkl, ring
 * numbers): glyphs 5 wide and 7 high in a cell 6 x 9 (one column of spacing,
 * one row above and below), drawn by Annula for this purpose. Only the
 * characters ring labels use are defined; any other is drawn as '?'.
 */

const ROWS: Record<string, readonly string[]> = {
  '0': ['.###.', '#...#', '#..##', '#.#.#', '##..#', '#...#', '.###.'],
  '1': ['..#..', '.##..', '#.#..', '..#..', '..#..', '..#..', '#####'],
  '2': ['.###.', '#...#', '....#', '...#.', '..#..', '.#...', '#####'],
  '3': ['####.', '....#', '....#', '.###.', '....#', '....#', '####.'],
  '4': ['...#.', '..##.', '.#.#.', '#..#.', '#####', '...#.', '...#.'],
  '5': ['#####', '#....', '####.', '....#', '....#', '#...#', '.###.'],
  '6': ['..##.', '.#...', '#....', '####.', '#...#', '#...#', '.###.'],
  '7': ['#####', '....#', '...#.', '..#..', '.#...', '.#...', '.#...'],
  '8': ['.###.', '#...#', '#...#', '.###.', '#...#', '#...#', '.###.'],
  '9': ['.###.', '#...#', '#...#', '.####', '....#', '...#.', '.##..'],
  '-': ['.....', '.....', '.....', '.###.', '.....', '.....', '.....'],
  '#': ['.#.#.', '.#.#.', '#####', '.#.#.', '#####', '.#.#.', '.#.#.'],
  '(': ['...#.', '..#..', '.#...', '.#...', '.#...', '..#..', '...#.'],
  ')': ['.#...', '..#..', '...#.', '...#.', '...#.', '..#..', '.#...'],
  '?': ['.###.', '#...#', '....#', '...#.', '..#..', '.....', '..#..'],
  ' ': ['.....', '.....', '.....', '.....', '.....', '.....', '.....'],
};

/** Cell size of one glyph in font units (glyph 5 x 7 plus spacing). */
export const GLYPH_CELL = { width: 6, height: 9 } as const;

/** Bit rows of a glyph: GLYPHS.get(ch)[row][col] is true where ink is. */
const GLYPHS = new Map<string, boolean[][]>(Object.entries(ROWS).map(([ch, rows]) => [ch, rows.map((r) => [...r].map((c) => c === '#'))]));

/** The glyph of `ch` (the '?' glyph for a character the font lacks). */
export function glyphOf(ch: string): boolean[][] {
  return GLYPHS.get(ch) ?? GLYPHS.get('?')!;
}

/** Width of `text` drawn at `scale` (pixels per font unit), without the trailing spacing column. */
export function bitmapTextWidth(text: string, scale: number): number {
  return text.length === 0 ? 0 : (text.length * GLYPH_CELL.width - 1) * scale;
}
