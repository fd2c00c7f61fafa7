/**
 * Memory budget: GNU binutils `size` output, parsed, and turned into flash and RAM use.
 *
 * The three formats count differently (GNU Binutils manual, "size"): Berkeley (the default) counts
 * read-only data in `text`; GNU (`-G`) counts it in `data`; SysV (`-A`) lists every section and its
 * Total also counts sections that are never loaded, such as .comment. The parser keeps what the
 * report says and checks its own arithmetic; the rule that turns sections into flash and RAM is
 * chosen per architecture and stated in the result, with what it assumes.
 */

export type SizeReportFormat = 'berkeley' | 'sysv' | 'gnu';

export interface SizeSection {
  name: string;
  size: number;
  address: number;
}

export interface SizeReportEntry {
  filename: string;
  /** Berkeley and GNU columns; absent for SysV, which lists sections instead. */
  text?: number;
  data?: number;
  bss?: number;
  /** `dec` (Berkeley), `total` (GNU) or `Total` (SysV). */
  total: number;
  /** SysV only; empty for the column formats. */
  sections: SizeSection[];
}

export interface ParsedSizeReport {
  format: SizeReportFormat;
  entries: SizeReportEntry[];
  /** The `(TOTALS)` row that `size -t` adds to the column formats. */
  totals?: { text: number; data: number; bss: number; total: number };
}

/** The text is not a `size` report, or its numbers do not add up. */
export class SizeReportError extends Error {
  override name = 'SizeReportError';
  constructor(
    message: string,
    /** 1-based line of the report the problem is on, when there is one. */
    readonly line?: number,
  ) {
    super(line === undefined ? message : `Line ${line}: ${message}`);
  }
}

const BERKELEY_HEADER = /^text\s+data\s+bss\s+dec\s+hex\s+filename$/i;
const GNU_HEADER = /^text\s+data\s+bss\s+total\s+filename$/i;
const SYSV_HEADER = /^section\s+size\s+addr$/i;

/** Decimal, 0x-hex (`size -x`) or 0-octal (`size -o`), as binutils prints them. */
function parseNumber(token: string, lineNo: number, what: string): number {
  let value: number;
  if (/^0x[0-9a-f]+$/i.test(token)) value = Number.parseInt(token.slice(2), 16);
  else if (/^0[0-7]+$/.test(token)) value = Number.parseInt(token.slice(1), 8);
  else if (/^\d+$/.test(token)) value = Number.parseInt(token, 10);
  else throw new SizeReportError(`expected a number for ${what}, found "${token}"`, lineNo);
  if (!Number.isSafeInteger(value)) throw new SizeReportError(`${what} is too large: "${token}"`, lineNo);
  return value;
}

interface Line {
  no: number;
  text: string;
}

function parseColumns(lines: Line[], format: 'berkeley' | 'gnu'): ParsedSizeReport {
  const entries: SizeReportEntry[] = [];
  let totals: ParsedSizeReport['totals'];
  const columns = format === 'berkeley' ? 5 : 4;
  for (const { no, text } of lines) {
    const tokens = text.split(/\s+/);
    if (tokens.length < columns + 1) {
      throw new SizeReportError(
        `expected ${format === 'berkeley' ? 'text, data, bss, dec, hex' : 'text, data, bss, total'} and a file name`,
        no,
      );
    }
    const text_ = parseNumber(tokens[0]!, no, 'text');
    const data = parseNumber(tokens[1]!, no, 'data');
    const bss = parseNumber(tokens[2]!, no, 'bss');
    const total = parseNumber(tokens[3]!, no, format === 'berkeley' ? 'dec' : 'total');
    if (text_ + data + bss !== total) {
      throw new SizeReportError(`text + data + bss = ${text_ + data + bss}, but the report says ${total}`, no);
    }
    if (format === 'berkeley') {
      const hex = tokens[4]!;
      if (!/^[0-9a-f]+$/i.test(hex) || Number.parseInt(hex, 16) !== total) {
        throw new SizeReportError(`the hex column "${hex}" does not match dec ${total}`, no);
      }
    }
    const filename = tokens.slice(columns).join(' ');
    if (filename === '(TOTALS)') totals = { text: text_, data, bss, total };
    else entries.push({ filename, text: text_, data, bss, total, sections: [] });
  }
  if (entries.length === 0) throw new SizeReportError('the report has a header but no file rows');
  return { format, entries, ...(totals ? { totals } : {}) };
}

function parseSysv(lines: Line[]): ParsedSizeReport {
  const entries: SizeReportEntry[] = [];
  let i = 0;
  while (i < lines.length) {
    const nameLine = lines[i]!;
    const name = /^(.*\S)\s*:$/.exec(nameLine.text);
    if (!name)
      throw new SizeReportError(`expected "<file>  :" to start a section table, found "${nameLine.text}"`, nameLine.no);
    const header = lines[i + 1];
    if (!header || !SYSV_HEADER.test(header.text)) {
      throw new SizeReportError('expected the header "section size addr"', header?.no ?? nameLine.no);
    }
    i += 2;
    const sections: SizeSection[] = [];
    let total: number | undefined;
    while (i < lines.length && total === undefined) {
      const { no, text } = lines[i]!;
      const tokens = text.split(/\s+/);
      if (tokens[0] === 'Total') {
        if (tokens.length !== 2) throw new SizeReportError('expected "Total <size>"', no);
        total = parseNumber(tokens[1]!, no, 'Total');
      } else {
        if (tokens.length !== 3) throw new SizeReportError(`expected "<section> <size> <addr>", found "${text}"`, no);
        sections.push({
          name: tokens[0]!,
          size: parseNumber(tokens[1]!, no, 'size'),
          address: parseNumber(tokens[2]!, no, 'addr'),
        });
      }
      i += 1;
    }
    if (total === undefined)
      throw new SizeReportError(`the section table of ${name[1]} has no Total line (is the report cut off?)`);
    const sum = sections.reduce((acc, s) => acc + s.size, 0);
    if (sum !== total)
      throw new SizeReportError(
        `the sections of ${name[1]} add up to ${sum}, but Total says ${total}`,
        lines[i - 1]!.no,
      );
    entries.push({ filename: name[1]!, total, sections });
  }
  if (entries.length === 0) throw new SizeReportError('no section table found');
  return { format: 'sysv', entries };
}

/** Parses `size`, `size -A` or `size -G` output; the format is recognised from its header. */
export function parseSizeReport(report: string): ParsedSizeReport {
  const lines: Line[] = report
    .split(/\r\n|\n|\r/)
    .map((text, index) => ({ no: index + 1, text: text.trim() }))
    .filter((line) => line.text !== '');
  if (lines.length === 0) throw new SizeReportError('the size report is empty');
  if (lines.some((l) => /^AVR Memory Usage/i.test(l.text))) {
    throw new SizeReportError(
      'this is the avr-size -C summary, which hides the sections: paste the output of avr-size -A instead',
    );
  }
  const berkeley = lines.findIndex((l) => BERKELEY_HEADER.test(l.text));
  if (berkeley >= 0) return parseColumns(lines.slice(berkeley + 1), 'berkeley');
  const gnu = lines.findIndex((l) => GNU_HEADER.test(l.text));
  if (gnu >= 0) return parseColumns(lines.slice(gnu + 1), 'gnu');
  const sysv = lines.findIndex((l) => SYSV_HEADER.test(l.text));
  if (sysv >= 1) return parseSysv(lines.slice(sysv - 1));
  throw new SizeReportError(
    'not a binutils size report: expected the header "text data bss dec hex filename" (size), "section size addr" (size -A) or "text data bss total filename" (size -G)',
  );
}

// ---------------------------------------------------------------------------------------------
// From sections to a memory budget

export type Architecture = 'avr' | 'arm' | 'xtensa' | 'generic';

export interface MemoryUseOptions {
  architecture: Architecture;
  capacities: { flashBytes: number; ramBytes: number; eepromBytes?: number };
  /** Flash the bootloader keeps for itself; the firmware gets the rest. */
  bootloaderBytes?: number;
  /** Warn at or above this use, percent of what is available; default 90. */
  warnAtPercent?: number;
  /** Which file of a multi-file report; needed when the report lists more than one. */
  filename?: string;
}

export interface MemoryUse {
  filename: string;
  format: SizeReportFormat;
  architecture: Architecture;
  flashUsed: number;
  ramUsed: number;
  eepromUsed?: number;
  flashAvailable: number;
  ramAvailable: number;
  flashPercent: number;
  ramPercent: number;
  eepromPercent?: number;
  /** The rule used, in words, with its source. */
  rule: string;
  /** What the rule takes for granted for this format and architecture. */
  assumptions: string[];
  warnAtPercent: number;
  warnings: { flash: boolean; ram: boolean; eeprom: boolean };
  /** True when any of the above is. */
  warning: boolean;
}

export const DEFAULT_WARN_AT_PERCENT = 90;

const AVR_RULE =
  'avr-libc User Manual, "Memory Sections" (note under .text): flash used = .text + .data (the initial values of .data are stored in flash), static RAM = .data + .bss.';

// Sections that SysV lists but that never reach the target: comments, notes, debug and symbol data.
const NOT_LOADED =
  /^\.(comment|note|debug|stab|ARM\.attributes|xtensa\.info|riscv\.attributes|gnu\.attributes|symtab|strtab|shstrtab|ident)/;

interface Split {
  flash: number;
  ram: number;
  eeprom?: number;
  rule: string;
  assumptions: string[];
}

function sectionSize(entry: SizeReportEntry, name: string): number {
  return entry.sections.filter((s) => s.name === name).reduce((acc, s) => acc + s.size, 0);
}

function avrSplit(entry: SizeReportEntry, format: SizeReportFormat): Split {
  if (format === 'sysv') {
    if (!entry.sections.some((s) => s.name === '.text')) {
      throw new SizeReportError(`${entry.filename} has no .text section: is this the firmware ELF?`);
    }
    const text = sectionSize(entry, '.text');
    const data = sectionSize(entry, '.data');
    const bss = sectionSize(entry, '.bss');
    const noinit = sectionSize(entry, '.noinit');
    const eeprom = entry.sections.some((s) => s.name === '.eeprom') ? sectionSize(entry, '.eeprom') : undefined;
    const assumptions: string[] = [];
    if (noinit > 0) assumptions.push('.noinit is also counted in RAM: avr-libc places it in RAM after .bss.');
    assumptions.push(
      'Sections such as .comment, .note.* and .debug_* are not loaded and are not counted (SysV Total includes them).',
    );
    return {
      flash: text + data,
      ram: data + bss + noinit,
      ...(eeprom !== undefined ? { eeprom } : {}),
      rule: AVR_RULE,
      assumptions,
    };
  }
  const { text = 0, data = 0, bss = 0 } = entry;
  return {
    flash: text + data,
    ram: data + bss,
    rule: `${AVR_RULE} Applied to the ${format === 'berkeley' ? 'Berkeley' : 'GNU'} columns as flash = text + data, RAM = data + bss.`,
    assumptions: [
      format === 'berkeley'
        ? 'Berkeley text includes read-only data, which avr-gcc keeps in flash unless it is copied to RAM with .data.'
        : 'GNU counts read-only data in data; on AVR the default linker script places .rodata inside .data (in RAM), so data + bss holds.',
      'The columns cannot separate .noinit or .eeprom; paste avr-size -A output to see them.',
    ],
  };
}

function columnSplit(
  entry: SizeReportEntry,
  format: 'berkeley' | 'gnu',
  architecture: Exclude<Architecture, 'avr'>,
): Split {
  const { text = 0, data = 0, bss = 0 } = entry;
  const assumptions = [
    'Initial values of data are stored in flash and copied to RAM at start-up, so data counts in both (usual for GNU linker scripts; an assumption).',
  ];
  if (format === 'gnu') {
    assumptions.push(
      'GNU format counts read-only data in data; where read-only data stays in flash, RAM = data + bss is an upper bound. The Berkeley or SysV format separates it.',
    );
  }
  if (architecture === 'xtensa') {
    assumptions.push(
      'RAM counts data + bss (DRAM) only; code placed in IRAM occupies instruction RAM as well and is not counted here.',
    );
  }
  if (architecture === 'arm') {
    assumptions.push('Heap and stack reservations count only if the linker script puts them in bss-like sections.');
  }
  return {
    flash: text + data,
    ram: data + bss,
    rule: `flash used = text + data, static RAM = data + bss (${format === 'berkeley' ? 'Berkeley' : 'GNU'} columns, GNU Binutils manual "size").`,
    assumptions,
  };
}

function sysvSplit(entry: SizeReportEntry, architecture: Exclude<Architecture, 'avr'>): Split {
  let flash = 0;
  let ram = 0;
  for (const section of entry.sections) {
    if (NOT_LOADED.test(section.name) || section.size === 0) continue;
    if (/bss|noinit|\.heap|\.stack/i.test(section.name)) ram += section.size;
    else if (/\.data|iram/i.test(section.name)) {
      flash += section.size;
      ram += section.size;
    } else flash += section.size;
  }
  return {
    flash,
    ram,
    rule: 'From SysV sections by name: *bss*, *noinit*, heap and stack sections count in RAM; *.data* (and ESP32 IRAM) sections in flash and RAM; other loaded sections in flash.',
    assumptions: [
      'SysV output carries no section flags, so sections are classified by name (an assumption: check unusual section names).',
      'Sections such as .comment, .note.*, .debug_* and .ARM.attributes are not loaded and are not counted (SysV Total includes them).',
      ...(architecture === 'xtensa'
        ? ['IRAM code counts in RAM as well as in flash, since it is copied from flash at boot.']
        : []),
    ],
  };
}

function pickEntry(parsed: ParsedSizeReport, filename?: string): SizeReportEntry {
  if (filename !== undefined) {
    const found = parsed.entries.find((e) => e.filename === filename);
    if (!found) throw new SizeReportError(`the report has no file "${filename}"`);
    return found;
  }
  if (parsed.entries.length > 1) {
    throw new SizeReportError(
      `the report lists ${parsed.entries.length} files (${parsed.entries.map((e) => e.filename).join(', ')}): say which one is the firmware`,
    );
  }
  return parsed.entries[0]!;
}

function percent(used: number, available: number): number {
  return available > 0 ? (used / available) * 100 : Number.POSITIVE_INFINITY;
}

/** Flash, RAM (and EEPROM, when the report shows it) used against the part's capacities. */
export function memoryUse(parsed: ParsedSizeReport, options: MemoryUseOptions): MemoryUse {
  const { architecture, capacities } = options;
  const bootloaderBytes = options.bootloaderBytes ?? 0;
  const warnAtPercent = options.warnAtPercent ?? DEFAULT_WARN_AT_PERCENT;
  if (!(capacities.flashBytes > 0) || !(capacities.ramBytes > 0)) throw new RangeError('capacities must be positive');
  if (bootloaderBytes < 0 || bootloaderBytes >= capacities.flashBytes) {
    throw new RangeError('the bootloader reservation must be at least 0 and smaller than the flash');
  }
  const entry = pickEntry(parsed, options.filename);
  const split =
    architecture === 'avr'
      ? avrSplit(entry, parsed.format)
      : parsed.format === 'sysv'
        ? sysvSplit(entry, architecture)
        : columnSplit(entry, parsed.format, architecture);
  const flashAvailable = capacities.flashBytes - bootloaderBytes;
  const ramAvailable = capacities.ramBytes;
  const flashPercent = percent(split.flash, flashAvailable);
  const ramPercent = percent(split.ram, ramAvailable);
  const eepromPercent =
    split.eeprom !== undefined && capacities.eepromBytes ? percent(split.eeprom, capacities.eepromBytes) : undefined;
  const assumptions = [...split.assumptions];
  if (bootloaderBytes > 0) assumptions.push(`${bootloaderBytes} bytes of flash are kept by the bootloader.`);
  assumptions.push('Static RAM does not include the stack and heap, which need what is left at run time.');
  const warnings = {
    flash: flashPercent >= warnAtPercent,
    ram: ramPercent >= warnAtPercent,
    eeprom: eepromPercent !== undefined && eepromPercent >= warnAtPercent,
  };
  return {
    filename: entry.filename,
    format: parsed.format,
    architecture,
    flashUsed: split.flash,
    ramUsed: split.ram,
    ...(split.eeprom !== undefined ? { eepromUsed: split.eeprom } : {}),
    flashAvailable,
    ramAvailable,
    flashPercent,
    ramPercent,
    ...(eepromPercent !== undefined ? { eepromPercent } : {}),
    rule: split.rule,
    assumptions,
    warnAtPercent,
    warnings,
    warning: warnings.flash || warnings.ram || warnings.eeprom,
  };
}
