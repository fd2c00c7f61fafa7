/**
 * Pin map rows from a spreadsheet export. Makers keep pin tables in spreadsheets and EDA tools
 * that write CSV with either separator (`;` where the comma is the decimal mark), quote fields per
 * RFC 4180, and may start with a byte-order mark. The parser keeps every row it can read and
 * reports the others by line, so the maker fixes the file instead of guessing.
 */
import { pinMapRowSchema, requiredFunctions, type PinMapRow, type RequiredFunction } from '../contracts/parts';

/** The names the pin map table and the CSV import show for each required function. */
export const requiredFunctionLabels: Record<RequiredFunction, string> = {
  digital_in: 'Digital in',
  digital_out: 'Digital out',
  analog_in: 'Analog in',
  pwm: 'PWM',
  ext_interrupt: 'External interrupt',
  pin_change_interrupt: 'Pin-change interrupt',
  i2c_sda: 'I²C SDA',
  i2c_scl: 'I²C SCL',
  spi_mosi: 'SPI MOSI',
  spi_miso: 'SPI MISO',
  spi_sck: 'SPI SCK',
  spi_ss: 'SPI SS',
  uart_tx: 'UART TX',
  uart_rx: 'UART RX',
};

/** Other words people write in the function column, beyond our codes and the labels above. */
const functionSynonyms: Record<string, RequiredFunction> = {
  'digital input': 'digital_in',
  input: 'digital_in',
  in: 'digital_in',
  'digital output': 'digital_out',
  output: 'digital_out',
  out: 'digital_out',
  'analog input': 'analog_in',
  analog: 'analog_in',
  adc: 'analog_in',
  'hardware pwm': 'pwm',
  interrupt: 'ext_interrupt',
  'ext interrupt': 'ext_interrupt',
  int: 'ext_interrupt',
  'pin change': 'pin_change_interrupt',
  pcint: 'pin_change_interrupt',
  sda: 'i2c_sda',
  scl: 'i2c_scl',
  mosi: 'spi_mosi',
  miso: 'spi_miso',
  sck: 'spi_sck',
  ss: 'spi_ss',
  cs: 'spi_ss',
  'spi cs': 'spi_ss',
  tx: 'uart_tx',
  rx: 'uart_rx',
};

/** "I²C SDA", "i2c_sda", "I2C-SDA" → "i2c sda". */
function functionKey(text: string): string {
  return text
    .normalize('NFKC')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

const functionsByKey: ReadonlyMap<string, RequiredFunction> = new Map([
  ...Object.entries(functionSynonyms).map(([k, v]) => [functionKey(k), v] as const),
  ...requiredFunctions.map((fn) => [functionKey(fn), fn] as const),
  ...requiredFunctions.map((fn) => [functionKey(requiredFunctionLabels[fn]), fn] as const),
]);

/** A function as written in a CSV cell: one of our codes or a readable name. */
export function parseRequiredFunction(text: string): RequiredFunction | undefined {
  return functionsByKey.get(functionKey(text));
}

export interface PinMapCsvError {
  /** 1-based line of the file the record starts on. */
  line: number;
  message: string;
}

export interface PinMapCsvResult {
  rows: PinMapRow[];
  errors: PinMapCsvError[];
}

interface CsvRecord {
  line: number;
  fields: string[];
}

/** The separator the header line uses: whichever of `;` and `,` occurs more often outside quotes. */
function detectSeparator(text: string): ';' | ',' {
  let semicolons = 0;
  let commas = 0;
  let quoted = false;
  for (const ch of text) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) break;
    else if (!quoted && ch === ';') semicolons += 1;
    else if (!quoted && ch === ',') commas += 1;
  }
  return semicolons > commas ? ';' : ',';
}

/** RFC 4180 records: quoted fields may hold separators, doubled quotes and line breaks. */
function readRecords(text: string, separator: string): { records: CsvRecord[]; unterminatedAt?: number } {
  const records: CsvRecord[] = [];
  let fields: string[] = [];
  let field = '';
  let quoted = false;
  let line = 1;
  let recordLine = 1;
  let quoteOpenedAt = 0;
  for (let i = 0; i < text.length; i += 1) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i += 1;
        } else quoted = false;
      } else {
        if (ch === '\n' || (ch === '\r' && text[i + 1] !== '\n')) line += 1;
        field += ch;
      }
      continue;
    }
    if (ch === '"' && field.trim() === '') {
      quoted = true;
      quoteOpenedAt = line;
      field = '';
    } else if (ch === separator) {
      fields.push(field);
      field = '';
    } else if (ch === '\r' || ch === '\n') {
      if (ch === '\r' && text[i + 1] === '\n') i += 1;
      fields.push(field);
      records.push({ line: recordLine, fields });
      fields = [];
      field = '';
      line += 1;
      recordLine = line;
    } else field += ch;
  }
  if (quoted) return { records, unterminatedAt: quoteOpenedAt };
  if (field !== '' || fields.length > 0) {
    fields.push(field);
    records.push({ line: recordLine, fields });
  }
  return { records };
}

const COLUMN_NAMES: Record<string, 'pin' | 'signal' | 'function' | 'driven_at'> = {
  pin: 'pin',
  signal: 'signal',
  function: 'function',
  driven_at: 'driven_at',
  driven_at_volts: 'driven_at',
  drivenatvolts: 'driven_at',
  drivenat: 'driven_at',
};

function columnKey(header: string): string {
  return header
    .trim()
    .toLowerCase()
    .replace(/\(v\)$/, '')
    .trim()
    .replace(/[\s-]+/g, '_');
}

/** "5", "3.3", "3,3", "3.3 V", "3.3V" → volts; "" → undefined; anything else → NaN. */
function parseVolts(text: string): number | undefined {
  const value = text.trim().replace(/\s*v$/i, '');
  if (value === '') return undefined;
  if (!/^[-+]?\d+(?:[.,]\d+)?$/.test(value)) return Number.NaN;
  return Number(value.replace(',', '.'));
}

const MAX_ROWS = 400;

/**
 * Rows from CSV text with a header row naming the columns pin, signal, function and (optional)
 * driven_at, in any order and any case. Rows with a problem are left out and reported by line.
 */
export function parsePinMapCsv(text: string): PinMapCsvResult {
  const source = text.startsWith('\uFEFF') ? text.slice(1) : text;
  const separator = detectSeparator(source);
  const { records, unterminatedAt } = readRecords(source, separator);
  const errors: PinMapCsvError[] = [];
  const nonBlank = records.filter((r) => r.fields.some((f) => f.trim() !== ''));
  const header = nonBlank[0];
  if (!header) return { rows: [], errors: [{ line: 1, message: 'The file is empty: expected a header row.' }] };

  const columns = new Map<string, number>();
  header.fields.forEach((name, index) => {
    const column = COLUMN_NAMES[columnKey(name)];
    if (column && !columns.has(column)) columns.set(column, index);
  });
  const missing = (['pin', 'signal', 'function'] as const).filter((c) => !columns.has(c));
  if (missing.length > 0) {
    const names = missing.map((c) => `"${c}"`).join(', ');
    return {
      rows: [],
      errors: [
        {
          line: header.line,
          message: `The header row has no ${names} column${missing.length > 1 ? 's' : ''}: expected pin, signal, function and optionally driven_at.`,
        },
      ],
    };
  }

  const rows: PinMapRow[] = [];
  const cell = (record: CsvRecord, column: string) => {
    const index = columns.get(column);
    return index === undefined ? '' : (record.fields[index] ?? '').trim();
  };
  for (const record of nonBlank.slice(1)) {
    const pin = cell(record, 'pin');
    const signal = cell(record, 'signal');
    const fnText = cell(record, 'function');
    const problems: string[] = [];
    if (pin === '') problems.push('the pin is empty');
    if (signal === '') problems.push('the signal is empty');
    const fn = parseRequiredFunction(fnText);
    if (fnText === '') problems.push('the function is empty');
    else if (!fn) problems.push(`unknown function "${fnText}"`);
    const volts = parseVolts(cell(record, 'driven_at'));
    if (volts !== undefined && Number.isNaN(volts)) {
      problems.push(`"${cell(record, 'driven_at')}" is not a voltage`);
    }
    if (problems.length > 0) {
      errors.push({ line: record.line, message: capitalise(problems.join('; ')) + '.' });
      continue;
    }
    const parsed = pinMapRowSchema.safeParse({
      pin,
      signal,
      function: fn,
      ...(volts !== undefined ? { drivenAtVolts: volts } : {}),
    });
    if (!parsed.success) {
      const issue = parsed.error.issues[0]!;
      errors.push({ line: record.line, message: `${capitalise(String(issue.path[0] ?? 'row'))}: ${issue.message}.` });
      continue;
    }
    if (rows.length >= MAX_ROWS) {
      errors.push({ line: record.line, message: `A pin map holds at most ${MAX_ROWS} rows; this one is left out.` });
      continue;
    }
    rows.push(parsed.data);
  }
  if (unterminatedAt !== undefined) {
    errors.push({ line: unterminatedAt, message: 'A quoted field is never closed: the rest of the file is ignored.' });
  }
  return { rows, errors };
}

function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}
