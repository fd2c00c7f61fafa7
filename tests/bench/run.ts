/**
 * `npm run bench`: runs each benchmark and prints Markdown tables for docs/benchmarks.md.
 * `npm run bench -- http` runs only the named ones; BENCH_SECONDS sets the load duration.
 */
import os from 'node:os';

const suites: Record<string, () => Promise<{ run(seconds: number): Promise<string[]> }>> = {
  http: () => import('./http.bench'),
  writeups: () => import('./writeups.bench'),
  uploads: () => import('./uploads.bench'),
  search: () => import('./search.bench'),
};

const wanted = process.argv.slice(2);
const seconds = Number(process.env.BENCH_SECONDS ?? 10);
console.log(`# Benchmarks — ${new Date().toISOString()}`);
console.log(`Node ${process.version}, ${os.cpus().length} × ${os.cpus()[0]?.model ?? 'cpu'}, load average ${os.loadavg().map((l) => l.toFixed(2)).join(' ')}\n`);
for (const [name, importSuite] of Object.entries(suites)) {
  if (wanted.length && !wanted.includes(name)) continue;
  console.log(`## ${name}\n`);
  const suite = await importSuite();
  try {
    for (const line of await suite.run(seconds)) console.log(line);
  } catch (error) {
    console.error(`benchmark ${name} failed:`, error);
    process.exitCode = 1;
  }
  console.log('');
}
process.exit(process.exitCode ?? 0);
