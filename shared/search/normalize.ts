/**
 * How search sees the words makers type. Applied the same way to indexed text and to queries,
 * so the two always meet:
 *
 * - voltages have one spelling: `3.3V`, `3,3 V`, `3V3` → `3v3`; `5V`, `5 V` → `5v`;
 * - part numbers and pin labels (tokens with letters and digits) also index their tails after
 *   each letter/digit boundary, so `328p` finds `ATmega328P` and `74hc14` finds `SN74HC14`
 *   (tails shorter than three characters or without a digit are left out: `35` alone would
 *   match too much).
 */

const VOLTAGE_DECIMAL = /(?<![\w.,])(\d{1,3})[.,](\d{1,2})\s?[vV](?![\w])/g;
const VOLTAGE_WHOLE = /(?<![\w.,])(\d{1,4})\s?[vV](?![\w])/g;
const VOLTAGE_INFIX = /(?<![\w.,])(\d{1,3})[vV](\d{1,2})(?![\w])/g;

// Component values as makers write them: 4.7k, 4k7, 4.7 kΩ, 4K7 ohm → 4k7; 10 kΩ → 10k; 2.2uF → 2u2f.
// NFKC turns the micro sign (µ) into Greek mu (μ): both are accepted.
const VALUE_DECIMAL = /(?<![\w.,])(\d{1,3})[.,](\d{1,2})\s?([kKMmuµμnp])(?:\s?(Ω|ohms?|[fF]))?(?![\w])/g;
const VALUE_INFIX = /(?<![\w.,])(\d{1,3})([kKMRuµμnp])(\d{1,2})(?:\s?(Ω|ohms?|[fF]))?(?![\w])/g;
const VALUE_WHOLE = /(?<![\w.,])(\d{1,4})\s?([kKM])\s?(Ω|ohms?)(?![\w])/g;

function unit(prefix: string, suffix: string | undefined): { p: string; f: string } {
  const p = prefix === 'µ' || prefix === 'μ' ? 'u' : prefix === 'M' ? 'M' : prefix.toLowerCase();
  return { p, f: suffix && /^[fF]$/.test(suffix) ? 'f' : '' };
}

/** One spelling per resistor or capacitor value. */
export function normalizeValues(text: string): string {
  return text
    .replace(VALUE_DECIMAL, (_m, whole: string, frac: string, prefix: string, suffix?: string) => {
      const u = unit(prefix, suffix);
      return `${whole}${u.p}${frac}${u.f}`.toLowerCase();
    })
    .replace(VALUE_INFIX, (_m, whole: string, prefix: string, frac: string, suffix?: string) => {
      const u = unit(prefix === 'R' ? 'r' : prefix, suffix);
      return `${whole}${u.p}${frac}${u.f}`.toLowerCase();
    })
    .replace(VALUE_WHOLE, (_m, whole: string, prefix: string) => `${whole}${prefix.toLowerCase()}`);
}

/** One spelling per voltage, lowercased; everything else untouched. */
export function normalizeVoltages(text: string): string {
  return text
    .replace(VOLTAGE_DECIMAL, (_m, whole: string, frac: string) => `${whole}v${frac}`)
    .replace(VOLTAGE_INFIX, (_m, whole: string, frac: string) => `${whole}v${frac}`)
    .replace(VOLTAGE_WHOLE, (_m, whole: string) => `${whole}v`);
}

/** Text as the index and the query parser get it. */
export function normalizeForSearch(text: string): string {
  return normalizeValues(normalizeVoltages(text.normalize('NFKC')));
}

const CODE = /^(?=.*\d)(?=.*[a-z])[a-z0-9]{2,32}$/;

/** The tails of a part number or pin label worth matching on their own. */
export function codeTails(token: string): string[] {
  const code = token.toLowerCase();
  if (!CODE.test(code)) return [];
  const tails: string[] = [];
  for (let i = 1; i < code.length; i++) {
    const before = code[i - 1]!;
    const here = code[i]!;
    const boundary = /\d/.test(before) !== /\d/.test(here);
    if (!boundary) continue;
    const tail = code.slice(i);
    if (tail.length >= 3 && /\d/.test(tail)) tails.push(tail);
  }
  return tails;
}

/** Part numbers and pin labels in a text (lowercased, normalized), with their tails. */
export function codeLexemes(text: string): string[] {
  const found = new Set<string>();
  for (const raw of normalizeForSearch(text).toLowerCase().split(/[^a-z0-9]+/)) {
    if (!CODE.test(raw)) continue;
    found.add(raw);
    for (const tail of codeTails(raw)) found.add(tail);
  }
  return [...found];
}

/** Words worth offering in "did you mean": part numbers, pin labels and plain words of 4+ letters. */
export function vocabularyOf(text: string): string[] {
  const words = new Set<string>();
  for (const raw of normalizeForSearch(text).toLowerCase().split(/[^a-z0-9]+/)) {
    if (raw.length >= 3 && (CODE.test(raw) || /^[a-z]{4,24}$/.test(raw))) words.add(raw);
  }
  return [...words];
}
