import type { Command } from 'commander';
import { findSpaceGroup } from '../../../core/crystal';
import { collectPhases } from '../phase-sources';
import { printJson, type CliIo } from '../cli-io';
import { fixed } from '../number-format';
import { formatTable } from '../terminal-table';

interface PhasesOptions {
  phases?: string[];
  json?: boolean;
}

/** `annula phases`: the phase library (and any phases added from files). */
export function registerPhases(program: Command, io: CliIo): void {
  program
    .command('phases')
    .description('list the phase library: structure, space group, lattice constants and their sources')
    .option('--phases <files...>', 'add phases from CIF or JSON phase-description files')
    .option('--json', 'print JSON: an array of phases (id, name, formula, structureType, spaceGroup, crystalSystem, cell, source, origin)')
    .action((opts: PhasesOptions) => {
      const notes: string[] = [];
      const phases = collectPhases(opts.phases ?? [], notes);
      const rows = phases.map((p) => ({
        id: p.id,
        name: p.name,
        formula: p.formula,
        structureType: p.structureType,
        spaceGroup: p.spaceGroup,
        crystalSystem: findSpaceGroup(p.spaceGroup)?.crystalSystem ?? null,
        cell: p.cell,
        source: p.source,
        temperatureK: p.temperatureK ?? null,
        origin: p.origin,
      }));
      if (opts.json) {
        printJson(io, rows);
        return;
      }
      io.out(
        formatTable(
          ['id', 'name', 'structure', 'space group', 'a (Å)', 'c (Å)', 'source'],
          rows.map((r) => [
            r.id,
            r.name,
            r.structureType,
            r.spaceGroup,
            fixed(r.cell.aA, 4),
            r.crystalSystem === 'cubic' ? '' : fixed(r.cell.cA, 4),
            r.source.length > 60 ? r.source.slice(0, 57) + '...' : r.source,
          ]),
          ['left', 'left', 'left', 'left', 'right', 'right', 'left'],
        ),
      );
      io.out(`${rows.length} phases (${rows.filter((r) => r.crystalSystem === 'cubic').length} cubic). Full sources: annula phases --json`);
      for (const n of notes) io.err(`note: ${n}`);
    });
}
