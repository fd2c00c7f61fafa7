/**
 * The size-report parser against real GNU binutils `size` output, and the memory budget rule.
 *
 * Source for the formats: GNU Binutils manual, "size" — Berkeley (default) counts read-only data in
 * text; GNU (-G) counts it in data; SysV (-A) lists sections and its Total also counts sections that
 * are never loaded, such as .comment. The expected values come from the ELF section flags that
 * `readelf -S` prints, classified in this file by that rule, never from the parser under test.
 * AVR rule: avr-libc User Manual, "Memory Sections" (note under .text): flash = .text + .data,
 * RAM = .data + .bss.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memoryUse, parseSizeReport, SizeReportError, type ParsedSizeReport } from '../../../shared/checks/size-report';

const source = `
int counter = 42;                           /* .data: 4 bytes */
int table_init[4] = { 1, 2, 3, 4 };         /* .data: 16 bytes */
int zeroed[32];                             /* .bss: 128 bytes */
static char buffer[100];                    /* .bss: 100 bytes */
const int lookup[8] = { 1, 2, 3, 4, 5, 6, 7, 8 };  /* .rodata: 32 bytes */
int use(int i) { buffer[i] = 1; return lookup[i & 7] + counter + zeroed[i & 31] + table_init[i & 3]; }
`;

let dir: string;
let object: string;
const size = (...args: string[]) => execFileSync('size', [...args, object], { cwd: dir, encoding: 'utf8' });

interface ElfSection {
  name: string;
  size: number;
  nobits: boolean;
  alloc: boolean;
  write: boolean;
  exec: boolean;
}

/** Section sizes and flags as readelf reports them (independent of `size`). */
function readSections(file: string): ElfSection[] {
  const out = execFileSync('readelf', ['-S', '-W', file], { encoding: 'utf8' });
  const sections: ElfSection[] = [];
  for (const line of out.split('\n')) {
    const m = /^\s*\[\s*\d+\]\s+(\S+)\s+(\S+)\s+[0-9a-f]+\s+[0-9a-f]+\s+([0-9a-f]+)\s+[0-9a-f]+\s+([A-Z]*)\s+\d+/i.exec(
      line,
    );
    if (!m) continue;
    const flags = m[4]!;
    sections.push({
      name: m[1]!,
      size: Number.parseInt(m[3]!, 16),
      nobits: m[2] === 'NOBITS',
      alloc: flags.includes('A'),
      write: flags.includes('W'),
      exec: flags.includes('X'),
    });
  }
  return sections;
}

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'size-report-'));
  fs.writeFileSync(path.join(dir, 'budget.c'), source);
  execFileSync('gcc', ['-c', '-O0', 'budget.c', '-o', 'budget.o'], { cwd: dir });
  object = 'budget.o';
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('parseSizeReport on real binutils output (gcc -c -O0)', () => {
  it('recognises all three formats', () => {
    expect(parseSizeReport(size()).format).toBe('berkeley');
    expect(parseSizeReport(size('-A')).format).toBe('sysv');
    expect(parseSizeReport(size('-G')).format).toBe('gnu');
    expect(parseSizeReport(size('--format=sysv')).format).toBe('sysv');
  });

  it('SysV lists the sections readelf shows, with their sizes', () => {
    const sysv = parseSizeReport(size('-A'));
    const elf = readSections(path.join(dir, object));
    const [entry] = sysv.entries;
    expect(entry!.filename).toBe('budget.o');
    for (const section of entry!.sections) {
      expect(elf.find((s) => s.name === section.name)?.size, section.name).toBe(section.size);
    }
    const sizeOf = (name: string) => entry!.sections.find((s) => s.name === name)?.size ?? 0;
    // From the C source: .data ≥ 4 + 16 = 20 (alignment may pad), .bss ≥ 128 + 100 = 228, .rodata ≥ 8 × 4 = 32.
    expect(sizeOf('.data')).toBeGreaterThanOrEqual(20);
    expect(sizeOf('.bss')).toBeGreaterThanOrEqual(228);
    expect(sizeOf('.rodata')).toBeGreaterThanOrEqual(32);
    expect(sizeOf('.text')).toBeGreaterThan(0);
  });

  it('Berkeley: text = code + read-only data, data = writable, bss = no-bits (by ELF flags)', () => {
    const berkeley = parseSizeReport(size()).entries[0]!;
    const names = parseSizeReport(size('-A')).entries[0]!.sections.map((s) => s.name);
    const elf = readSections(path.join(dir, object)).filter((s) => names.includes(s.name) && s.alloc);
    const sum = (pick: (s: ElfSection) => boolean) => elf.filter(pick).reduce((acc, s) => acc + s.size, 0);
    expect(berkeley.text).toBe(sum((s) => !s.nobits && (s.exec || !s.write)));
    expect(berkeley.data).toBe(sum((s) => !s.nobits && s.write && !s.exec));
    expect(berkeley.bss).toBe(sum((s) => s.nobits));
    // .rodata is among the read-only sections counted in Berkeley text.
    expect(elf.some((s) => s.name === '.rodata' && !s.write)).toBe(true);
  });

  it('GNU: text = code only, read-only data counted in data; same total as Berkeley dec', () => {
    const gnu = parseSizeReport(size('-G')).entries[0]!;
    const berkeley = parseSizeReport(size()).entries[0]!;
    const names = parseSizeReport(size('-A')).entries[0]!.sections.map((s) => s.name);
    const elf = readSections(path.join(dir, object)).filter((s) => names.includes(s.name) && s.alloc);
    const sum = (pick: (s: ElfSection) => boolean) => elf.filter(pick).reduce((acc, s) => acc + s.size, 0);
    expect(gnu.text).toBe(sum((s) => !s.nobits && s.exec));
    expect(gnu.data).toBe(sum((s) => !s.nobits && !s.exec));
    expect(gnu.bss).toBe(berkeley.bss);
    const rodata = elf.find((s) => s.name === '.rodata')!.size;
    expect(gnu.data! - berkeley.data!).toBeGreaterThanOrEqual(rodata);
    expect(gnu.total).toBe(berkeley.total);
  });

  it('SysV Total also counts sections that are never loaded, such as .comment', () => {
    const sysv = parseSizeReport(size('-A')).entries[0]!;
    const berkeley = parseSizeReport(size()).entries[0]!;
    const elf = readSections(path.join(dir, object));
    const notLoaded = sysv.sections.filter((s) => !elf.find((e) => e.name === s.name)?.alloc);
    expect(notLoaded.map((s) => s.name)).toContain('.comment');
    expect(sysv.sections.find((s) => s.name === '.comment')!.size).toBeGreaterThan(0);
    expect(sysv.total).toBe(berkeley.total + notLoaded.reduce((acc, s) => acc + s.size, 0));
    expect(sysv.total).toBeGreaterThan(berkeley.total);
  });

  it('reads hex output (size -x, size -A -x) as the same numbers', () => {
    expect(parseSizeReport(size('-x')).entries).toEqual(parseSizeReport(size()).entries);
    expect(parseSizeReport(size('-A', '-x')).entries).toEqual(parseSizeReport(size('-A')).entries);
  });

  it('keeps the (TOTALS) row of size -t apart from the files', () => {
    const report = execFileSync('size', ['-t', object, object], { cwd: dir, encoding: 'utf8' });
    const parsed = parseSizeReport(report);
    const one = parseSizeReport(size()).entries[0]!;
    expect(parsed.entries).toHaveLength(2);
    expect(parsed.totals).toEqual({
      text: 2 * one.text!,
      data: 2 * one.data!,
      bss: 2 * one.bss!,
      total: 2 * one.total,
    });
    expect(() =>
      memoryUse(parsed, { architecture: 'generic', capacities: { flashBytes: 4096, ramBytes: 1024 } }),
    ).toThrow(/lists 2 files/);
  });

  it('memory use from the real Berkeley report: flash = text + data, RAM = data + bss', () => {
    const berkeley = parseSizeReport(size());
    const row = berkeley.entries[0]!;
    const use = memoryUse(berkeley, { architecture: 'generic', capacities: { flashBytes: 4096, ramBytes: 1024 } });
    expect(use.flashUsed).toBe(row.text! + row.data!);
    expect(use.ramUsed).toBe(row.data! + row.bss!);
    expect(use.flashPercent).toBeCloseTo(((row.text! + row.data!) / 4096) * 100, 9);
    expect(use.rule).toMatch(/text \+ data/);
  });
});

// A hand-written avr-size -A report for an ATmega328P firmware. Sections add up to Total:
// 29000 + 400 + 1500 + 17 + 64 + 2100 + 1400 = 34481.
const avrReport = `firmware.elf  :
section                     size      addr
.text                      29000         0
.data                        400   8388864
.bss                        1500   8389264
.comment                      17         0
.note.gnu.avr.deviceinfo      64         0
.debug_info                 2100         0
.debug_line                 1400         0
Total                      34481


`;

describe('memoryUse: AVR rule (avr-libc "Memory Sections") on a hand-written avr-size -A report', () => {
  const parsed: ParsedSizeReport = parseSizeReport(avrReport);
  // ATmega328P: 32 KB flash, 2 KB SRAM (datasheet memory summary); 2 KB bootloader leaves 30,720 bytes.
  const use = memoryUse(parsed, {
    architecture: 'avr',
    capacities: { flashBytes: 32768, ramBytes: 2048, eepromBytes: 1024 },
    bootloaderBytes: 2048,
  });

  it('flash = .text + .data = 29000 + 400 = 29400 bytes of 32768 − 2048 = 30720', () => {
    expect(use.flashUsed).toBe(29400);
    expect(use.flashAvailable).toBe(30720);
    // 29400 / 30720 = 245 / 256 = 0.95703125 → 95.703125 %
    expect(use.flashPercent).toBeCloseTo(95.703125, 9);
  });

  it('RAM = .data + .bss = 400 + 1500 = 1900 of 2048 bytes', () => {
    expect(use.ramUsed).toBe(1900);
    // 1900 / 2048 = 0.927734375 → 92.7734375 %
    expect(use.ramPercent).toBeCloseTo(92.7734375, 9);
  });

  it('ignores .comment, .note and .debug sections that SysV Total counts (34481 is not flash)', () => {
    expect(parsed.entries[0]!.total).toBe(34481);
    expect(use.flashUsed).not.toBe(34481);
  });

  it('warns at the default 90 % threshold for both, and names the rule', () => {
    expect(use.warnAtPercent).toBe(90);
    expect(use.warnings).toEqual({ flash: true, ram: true, eeprom: false });
    expect(use.warning).toBe(true);
    expect(use.rule).toMatch(/avr-libc User Manual, "Memory Sections"/);
  });

  it('the threshold is configurable: at 96 % neither warns (95.70 %, 92.77 %)', () => {
    const relaxed = memoryUse(parsed, {
      architecture: 'avr',
      capacities: { flashBytes: 32768, ramBytes: 2048 },
      bootloaderBytes: 2048,
      warnAtPercent: 96,
    });
    expect(relaxed.warning).toBe(false);
  });

  it('with the 512-byte bootloader the same firmware uses 29400 / 32256 = 91.146 % of flash', () => {
    const small = memoryUse(parsed, {
      architecture: 'avr',
      capacities: { flashBytes: 32768, ramBytes: 2048 },
      bootloaderBytes: 512,
    });
    expect(small.flashAvailable).toBe(32256);
    // 29400 / 32256 = 0.911458333… → 91.1458 %
    expect(small.flashPercent).toBeCloseTo(91.1458, 3);
  });

  it('counts .eeprom against the EEPROM when the report has it', () => {
    const withEeprom = avrReport
      .replace(
        '.comment                      17',
        '.eeprom                       16         0\n.comment                      17',
      )
      .replace('34481', '34497');
    const e = memoryUse(parseSizeReport(withEeprom), {
      architecture: 'avr',
      capacities: { flashBytes: 32768, ramBytes: 2048, eepromBytes: 1024 },
    });
    expect(e.eepromUsed).toBe(16);
    // 16 / 1024 = 1.5625 %
    expect(e.eepromPercent).toBeCloseTo(1.5625, 9);
    expect(e.flashUsed).toBe(29400);
  });

  it('the Berkeley form of the same firmware gives the same budget (text 29000, data 400, bss 1500)', () => {
    // dec = 29000 + 400 + 1500 = 30900 = 0x78b4
    const berkeley = `   text\t   data\t    bss\t    dec\t    hex\tfilename\n  29000\t    400\t   1500\t  30900\t   78b4\tfirmware.elf\n`;
    const b = memoryUse(parseSizeReport(berkeley), {
      architecture: 'avr',
      capacities: { flashBytes: 32768, ramBytes: 2048 },
      bootloaderBytes: 2048,
    });
    expect([b.flashUsed, b.ramUsed]).toEqual([29400, 1900]);
  });
});

describe('memoryUse: rules per architecture are stated with their assumptions', () => {
  const gnu = parseSizeReport(
    '      text       data        bss      total filename\n     10000       2000       3000      15000 app.elf\n',
  );
  it('ARM with GNU columns: RAM = data + bss is an upper bound because GNU counts read-only data in data', () => {
    const use = memoryUse(gnu, { architecture: 'arm', capacities: { flashBytes: 2097152, ramBytes: 270336 } });
    // flash = 10000 + 2000 = 12000; RAM = 2000 + 3000 = 5000
    expect([use.flashUsed, use.ramUsed]).toEqual([12000, 5000]);
    expect(use.assumptions.join(' ')).toMatch(/upper bound/);
  });

  it('ESP32 SysV sections are classified by name: DRAM data and bss in RAM, flash text and rodata in flash', () => {
    const report = `app.elf  :
section            size         addr
.iram0.vectors     1024   1074266112
.iram0.text        8000   1074267136
.dram0.data        2000   1073470304
.dram0.bss         5000   1073472304
.flash.rodata     30000   1061158944
.flash.text      100000   1074593824
.comment             50            0
.xtensa.info         56            0
Total            146130
`;
    const use = memoryUse(parseSizeReport(report), {
      architecture: 'xtensa',
      capacities: { flashBytes: 4194304, ramBytes: 532480 },
    });
    // flash = 1024 + 8000 + 2000 + 30000 + 100000 = 141024; RAM = 1024 + 8000 + 2000 + 5000 = 16024
    expect(use.flashUsed).toBe(141024);
    expect(use.ramUsed).toBe(16024);
    expect(use.assumptions.join(' ')).toMatch(/classified by name/);
  });
});

describe('parseSizeReport refuses malformed input with a clear message', () => {
  it.each([
    ['empty input', '', /empty/],
    ['text that is not a report', 'hello world\n', /not a binutils size report/],
    [
      'dec that is not text + data + bss',
      '   text\t   data\t    bss\t    dec\t    hex\tfilename\n    100\t     10\t     20\t    999\t    3e7\ta.out\n',
      /text \+ data \+ bss = 130, but the report says 999/,
    ],
    [
      'hex column that disagrees with dec',
      '   text\t   data\t    bss\t    dec\t    hex\tfilename\n    100\t     10\t     20\t    130\t     ff\ta.out\n',
      /hex column "ff" does not match dec 130/,
    ],
    [
      'a column that is not a number',
      '   text\t   data\t    bss\t    dec\t    hex\tfilename\n    1e2\t     10\t     20\t    130\t     82\ta.out\n',
      /expected a number for text, found "1e2"/,
    ],
    ['a header without rows', '   text\t   data\t    bss\t    dec\t    hex\tfilename\n', /no file rows/],
    ['a SysV table cut off before Total', 'a.out  :\nsection size addr\n.text 100 0\n.data 10 0\n', /no Total line/],
    [
      'a SysV Total that the sections do not add up to',
      'a.out  :\nsection size addr\n.text 100 0\n.data 10 0\nTotal 200\n',
      /add up to 110, but Total says 200/,
    ],
    [
      'the avr-size -C summary',
      'AVR Memory Usage\n----------------\nDevice: atmega328p\n\nProgram:    1234 bytes (3.8% Full)\n',
      /avr-size -A/,
    ],
  ])('%s', (_label, text, message) => {
    expect(() => parseSizeReport(text)).toThrow(SizeReportError);
    expect(() => parseSizeReport(text)).toThrow(message);
  });

  it('gives the line number of the problem', () => {
    try {
      parseSizeReport(
        '   text\t   data\t    bss\t    dec\t    hex\tfilename\n    100\t     10\t     20\t    999\t    3e7\ta.out\n',
      );
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(SizeReportError);
      expect((error as SizeReportError).line).toBe(2);
      expect((error as Error).message).toMatch(/^Line 2: /);
    }
  });

  it('refuses an AVR SysV report without .text', () => {
    const parsed = parseSizeReport('x.elf  :\nsection size addr\n.data 10 0\nTotal 10\n');
    expect(() => memoryUse(parsed, { architecture: 'avr', capacities: { flashBytes: 32768, ramBytes: 2048 } })).toThrow(
      /no \.text section/,
    );
  });
});
