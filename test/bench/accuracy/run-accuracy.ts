/**
 * The accuracy benchmark (issue 3, section 5): every case of accuracy-cases.ts is
 * simulated with its seed, analysed by the whole pipeline with the camera known
 * exactly, and compared with the truth; prints a table per case, the summary and the
 * targets met and missed, and writes the same tables to test/bench/accuracy/last-run.md.
 * It takes minutes (4096 x 4096 cases), so it is not part of `npm test`
 * (test/unit/bench/accuracy-cases.test.ts runs a few small cases instead).
 *
 *   npm run bench:accuracy                       all cases; writes last-run.md
 *   npm run bench:accuracy -- --only au-1k-standard,cr-2k-outside
 *   npm run bench:accuracy -- --max-side 2048    cases up to that image side
 *   npm run bench:accuracy -- --rings            also each ring against its true ring
 * A partial run (--only, --max-side) prints but never writes last-run.md.
 */
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadOpenCv } from '../../../app/node/load-opencv';
import { ACCURACY_CASES } from './accuracy-cases';
import { summarise } from './accuracy-summary';
import { evaluateCase, type CaseEvaluation } from './evaluate-case';
import { caseTable, definitionsText, renderMarkdown, renderText, summaryTable, targetTable } from './format-report';

function parseArgs(argv: string[]): { only: string[] | null; maxSide: number; rings: boolean } {
  let only: string[] | null = null;
  let maxSide = Infinity;
  let rings = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (a === '--only') only = (argv[++i] ?? '').split(',').filter(Boolean);
    else if (a === '--max-side') maxSide = Number(argv[++i]);
    else if (a === '--rings') rings = true;
    else throw new Error(`bench:accuracy: unknown argument ${a}; use --only id,id, --max-side N or --rings`);
  }
  if (!(maxSide > 0)) throw new Error('bench:accuracy: --max-side needs a positive number of pixels');
  if (only) for (const id of only) if (!ACCURACY_CASES.some((c) => c.id === id)) throw new Error(`bench:accuracy: no case '${id}'`);
  return { only, maxSide, rings };
}

function ringDetail(c: CaseEvaluation): string {
  const lines = [`  ${c.id}: true rings shown by the image (strong marked *)`, '    hkl        R_true px   peak e/px  visible  bound px   R err px   sigma px   own bound px  snr     d err ppm'];
  for (const r of c.rings) {
    const m = r.measured;
    lines.push(
      `    ${(r.hkl + (r.strong ? ' *' : '')).padEnd(10)} ${r.trueRadiusPx.toFixed(3).padStart(10)} ${r.truePeakCounts.toFixed(1).padStart(10)} ${r.visibleFraction.toFixed(2).padStart(8)} ${r.boundPx.toFixed(4).padStart(9)} ` +
        (m
          ? `${m.errorPx.toFixed(4).padStart(10)} ${m.sigmaPx.toFixed(4).padStart(10)} ${(m.analysisBoundPx === null ? '-' : m.analysisBoundPx.toFixed(4)).padStart(13)} ${m.snr.toFixed(0).padStart(5)} ${(m.dRelativeError * 1e6).toFixed(0).padStart(12)}`
          : '  (not found)'),
    );
  }
  if (c.unmatchedRings > 0) lines.push(`    ${c.unmatchedRings} analysed ring(s) matched no true ring`);
  return lines.join('\n');
}

function main(): void {
  const args = parseArgs(process.argv.slice(2));
  const selected = ACCURACY_CASES.filter((c) => (args.only ? args.only.includes(c.id) : true) && Math.max(c.spec.widthPx, c.spec.heightPx) <= args.maxSide);
  const partial = selected.length !== ACCURACY_CASES.length;
  const cv = loadOpenCv();
  const started = performance.now();
  const results: CaseEvaluation[] = [];
  for (const [k, c] of selected.entries()) {
    const r = evaluateCase(c, cv);
    results.push(r);
    process.stderr.write(`[${k + 1}/${selected.length}] ${c.id}: centre ${r.centreErrorPx.toFixed(4)} px, q err ${r.axisRatioError.toExponential(1)}, top-1 ${r.top1Phase ?? 'none'} (${((r.simulateMs + r.analyzeMs) / 1000).toFixed(1)} s)\n`);
    if (args.rings) console.log(ringDetail(r));
  }
  const totalS = (performance.now() - started) / 1000;
  const summary = summarise(results);
  const cases = caseTable(results);
  const sums = summaryTable(summary);
  const targets = targetTable(summary);
  console.log('\nAccuracy benchmark: each case simulated (seeded) and analysed with the camera known exactly\n');
  console.log(renderText(cases));
  console.log('');
  for (const line of definitionsText()) console.log(line);
  console.log('\nSummary\n');
  console.log(renderText(sums));
  console.log('\nTargets (issue 3, section 5)\n');
  console.log(renderText(targets));
  const missed = results.filter((r) => !r.phaseCorrect || r.status !== 'ok');
  console.log(`\n${summary.checks.filter((c) => c.met).length} of ${summary.checks.length} targets met; ${results.length} cases in ${totalS.toFixed(0)} s${missed.length ? `; wrong or no phase: ${missed.map((r) => r.id).join(', ')}` : ''}`);

  if (partial) {
    console.log('\n(partial run: last-run.md not written)');
    return;
  }
  const here = dirname(fileURLToPath(import.meta.url));
  const md = [
    '# Accuracy benchmark: last run',
    '',
    `Written by \`npm run bench:accuracy\` (test/bench/accuracy/run-accuracy.ts); do not edit by hand. ${results.length} simulated cases (accuracy-cases.ts, seeds there), each analysed by \`analyze\` with the phase library and the camera length known exactly. Run on ${new Date().toISOString().slice(0, 10)}, Node ${process.version}, ${totalS.toFixed(0)} s in all.`,
    '',
    '## Targets (issue 3, section 5)',
    '',
    renderMarkdown(targets),
    '',
    '## Summary',
    '',
    renderMarkdown(sums),
    '',
    '## Cases',
    '',
    renderMarkdown(cases),
    '',
    ...definitionsText().map((l) => `- ${l}`),
    '',
  ].join('\n');
  writeFileSync(join(here, 'last-run.md'), md);
  console.log(`\nwrote ${join('test/bench/accuracy', 'last-run.md')}`);
}

main();
