/**
 * A generated corpus for the search benchmark (a script, not committed data): 60,000 errata
 * and 40,000 log entries across 100 published projects, with maker-like text — a vocabulary
 * with a steep (Zipf-like) frequency curve so the commonest words are in nearly every item,
 * plus 5,000 invented part numbers that are each in only a handful. Written straight into the
 * source tables; the triggers queue everything and the real indexer builds the index.
 *
 * The corpus is kept under tests/bench/out/ (git-ignored) and reused by later runs.
 */
import { sql } from 'drizzle-orm';
import type { Db } from '../../db/client';

/** Words makers use, commonest first (position sets frequency). */
export const WORDS = (
  'board pin power supply voltage current relay regulator firmware sensor output input ground resistor capacitor ' +
  'header connector trace solder pad footprint signal clock reset button switch driver motor servo display ' +
  'battery charger fuse diode transistor mosfet led wire cable jumper bodge rework revision schematic layout ' +
  'silkscreen enclosure bracket screw thermal heat hot cold noise ripple spike brownout watchdog interrupt timer ' +
  'pwm adc dac uart spi i2c usb serial bootloader flash ram eeprom stack heap buffer overflow latency debounce ' +
  'pullup pulldown level shifter tolerant logic threshold margin datasheet errata workaround fix symptom cause ' +
  'measured scope probe multimeter bench prototype production batch order vendor substitute clone counterfeit ' +
  'tolerance drift calibration offset gain filter shunt kelvin loop isolation mains earth enclosure vent fan ' +
  'antenna radio wifi bluetooth range interference shielding decoupling bypass inductor ferrite crystal oscillator'
)
  .split(' ')
  .concat(Array.from({ length: 3800 }, (_, i) => `term${i}`));

export const PART_COUNT = 5000;
export const partName = (i: number) => `XK${1000 + i}M`;

export interface CorpusSize {
  projects: number;
  errata: number;
  logEntries: number;
}

export const DEFAULT_CORPUS: CorpusSize = { projects: 100, errata: 60_000, logEntries: 40_000 };

/** Fills an empty database (migrated, no demo data needed) with the corpus. */
export async function buildCorpus(db: Db, size: CorpusSize = DEFAULT_CORPUS): Promise<void> {
  // The vocabulary is a constant of [a-z0-9] words, safe to write into the function's body.
  if (!WORDS.every((w) => /^[a-z0-9]+$/.test(w))) throw new Error('corpus words must be [a-z0-9]');
  // One transaction, so one session: random() follows the seed and the corpus is the same every build.
  await db.transaction(async (tx) => {
    await tx.execute(sql`SELECT setseed(0.2026)`);
    await tx.execute(
      sql.raw(`
    CREATE OR REPLACE FUNCTION bench_words(n int) RETURNS text LANGUAGE sql VOLATILE AS $$
      SELECT string_agg(v[1 + floor(power(random(), 3) * array_length(v, 1))::int], ' ')
      FROM (SELECT ARRAY['${WORDS.join("','")}'] AS v) vocab, generate_series(1, n)
    $$`),
    );
    const [owner] = (
      await tx.execute<{ id: number }>(sql`
      INSERT INTO users (handle, display_name, role) VALUES ('corpus-maker', 'Corpus Maker', 'member') RETURNING id`)
    ).rows;
    await tx.execute(sql`
    INSERT INTO projects (slug, owner_id, title, summary, licence, status, published_at, next_erratum_number)
    SELECT 'corpus-' || g, ${owner!.id}, 'Corpus project ' || g || ' ' || bench_words(3), bench_words(15),
      'MIT', 'published', now(), 1
    FROM generate_series(1, ${size.projects}) g`);
    const perProject = Math.ceil(size.errata / size.projects);
    await tx.execute(sql`
    INSERT INTO errata (project_id, number, title, category_slug, severity, status, symptom, cause, workaround, fix, parts, pins,
      current_revision, created_at, updated_at)
    SELECT p.id, n,
      initcap(bench_words(6)),
      (ARRAY['pin-capability','logic-level','power','footprint-layout','bom-part-choice','mechanical','firmware','documentation'])[1 + (n % 8)],
      (ARRAY['cosmetic','minor','major','critical']::severity[])[1 + (n % 4)],
      (ARRAY['open','workaround','fixed_later','wont_fix']::erratum_status[])[1 + ((n / 4) % 4)],
      bench_words(40), bench_words(40), bench_words(30), bench_words(15),
      ARRAY['XK' || (1000 + floor(random() * ${PART_COUNT})::int) || 'M'],
      ARRAY['GP' || floor(random() * 30)::int],
      1, now() - (random() * interval '700 days'), now() - (random() * interval '700 days')
    FROM projects p CROSS JOIN generate_series(1, ${perProject}) n
    WHERE p.slug LIKE 'corpus-%'`);
    const logsPerProject = Math.ceil(size.logEntries / size.projects);
    await tx.execute(sql`
    INSERT INTO documents (project_id, kind, title, position, logged_on, body, current_revision, created_at, updated_at)
    SELECT p.id, 'log_entry', initcap(bench_words(5)), 0, (now() - (n || ' days')::interval)::date,
      bench_words(180), 1, now() - (random() * interval '700 days'), now() - (random() * interval '700 days')
    FROM projects p CROSS JOIN generate_series(1, ${logsPerProject}) n
    WHERE p.slug LIKE 'corpus-%'`);
    await tx.execute(sql`ANALYZE`);
  });
}
