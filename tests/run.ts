/**
 * `npm test`: lint, typecheck, then every vitest suite (unit, api, e2e). Ends with one line
 * `N passed, N failed` totalling all of them (lint and typecheck count as one check each),
 * and exits non-zero when anything failed. Extra arguments go to vitest (e.g. a file filter).
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '..');
const bin = (name: string) => path.join(root, 'node_modules', '.bin', name);
let passed = 0;
let failed = 0;

function step(label: string, command: string, args: string[]): boolean {
  console.log(`\n── ${label} ──`);
  const started = Date.now();
  const result = spawnSync(command, args, { cwd: root, stdio: 'inherit', env: process.env });
  const ok = result.status === 0;
  console.log(`${ok ? '✓' : '✗'} ${label} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
  return ok;
}

const extra = process.argv.slice(2);
if (extra.length === 0) {
  for (const [label, command, args] of [
    ['lint', bin('eslint'), ['.', '--max-warnings', '0']],
    ['typecheck', bin('vue-tsc'), ['-b', '--noEmit']],
  ] as const) {
    if (step(label, command, [...args])) passed++;
    else failed++;
  }
}

const report = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-vitest-')), 'report.json');
const suitesOk = step('test suites', bin('vitest'), [
  'run',
  '--reporter=default',
  '--reporter=json',
  `--outputFile.json=${report}`,
  ...extra,
]);
if (fs.existsSync(report)) {
  const results = JSON.parse(fs.readFileSync(report, 'utf8')) as {
    numPassedTests: number;
    numFailedTests: number;
    numFailedTestSuites: number;
    testResults: { status: string; message?: string; assertionResults: unknown[] }[];
  };
  passed += results.numPassedTests;
  // A file that fails before its tests run (setup error) has no failed tests: count it once.
  const brokenFiles = results.testResults.filter((f) => f.status === 'failed' && f.assertionResults.length === 0).length;
  failed += results.numFailedTests + brokenFiles;
  if (!suitesOk && results.numFailedTests + brokenFiles === 0) failed++;
} else if (!suitesOk) {
  failed++;
}

console.log(`\n${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
