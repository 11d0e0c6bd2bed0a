// `npm run bench [-- --json] [-- SECTION …]`: runs every benchmark section in
// server/scripts/bench/*.bench.ts. A section exports
// `run(): Promise<Record<string, number>>`; its keys must be unique across
// sections. Without --json each section's figures are printed as a table;
// with --json progress goes to stderr and stdout gets one JSON line that
// merges every section's record.
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';

interface BenchSection {
  run: () => Promise<Record<string, number | string>>;
}

const { values, positionals } = parseArgs({
  args: process.argv.slice(2),
  allowPositionals: true,
  options: { json: { type: 'boolean' } },
});
const isJson = values.json === true;
const dir = path.join(import.meta.dirname, 'bench');
const sections = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .map((f) => f.replace(/\.bench\.ts$/, ''))
  .filter((name) => positionals.length === 0 || positionals.includes(name))
  .sort();
if (sections.length === 0) {
  process.stderr.write(`bench: no section matches ${positionals.join(', ')}\n`);
  process.exit(2);
}

const merged: Record<string, number | string> = {};
for (const name of sections) {
  process.stderr.write(`bench: ${name} …\n`);
  const section = (await import(
    pathToFileURL(path.join(dir, `${name}.bench.ts`)).href
  )) as BenchSection;
  const record = await section.run();
  for (const [key, value] of Object.entries(record)) {
    if (Object.hasOwn(merged, key)) {
      throw new Error(`bench: section ${name} repeats the key ${key}`);
    }
    merged[key] = value;
  }
  if (!isJson) {
    const width = Math.max(...Object.keys(record).map((k) => k.length));
    process.stdout.write(`\n${name}\n`);
    for (const [key, value] of Object.entries(record)) {
      process.stdout.write(
        `  ${key.padEnd(width)}  ${typeof value === 'number' ? Number(value.toPrecision(4)) : value}\n`,
      );
    }
  }
}
if (isJson) process.stdout.write(`${JSON.stringify(merged)}\n`);
