/**
 * Demo pin maps and firmware builds for two demo projects. Everything here is invented for the
 * demo: the signals follow the projects' write-ups (db/demo/write-ups), and the `size -A` reports
 * are made-up numbers in the layout avr-size and arm-none-eabi-size print, with Totals that add up.
 *
 * The story matches the demo errata: the greenhouse vent controller's Rev A drives the relay from
 * A6, which is analog input only on the ATmega328P (erratum E1, fixed in Rev B), and that is the
 * one mistake in these pin maps; Rev B and the bench supply monitor check clean. The greenhouse
 * builds form a small optimisation ledger (strings to flash, no floating-point printf), the last
 * one spending bytes on Rev B's 12 V sense.
 */
import { and, eq } from 'drizzle-orm';
import type { PinMapRow } from '../../shared/contracts/parts';
import { memoryUse, parseSizeReport } from '../../shared/checks/size-report';
import { architectureOf } from '../../api/parts/architecture';
import { contentHash } from '../../api/revisions/versioned';
import type { Tx } from '../client';
import { boardRevisions, firmwareBuilds, parts, pinMaps, projects, revisions } from '../schema';
import type { PartProfile } from '../../shared/contracts/parts';

export interface DemoPinMap {
  project: string;
  board: string;
  part: string;
  supplyVolts: number | null;
  author: string;
  /** YYYY-MM-DD, when the map was written down. */
  on: string;
  rows: PinMapRow[];
}

export interface DemoBuild {
  project: string;
  part: string;
  label: string;
  builtOn: string;
  changeNote: string;
  author: string;
  bootloaderBytes: number;
  file: string;
  /** [section, size, address] as `size -A` lists them. */
  sections: [string, number, number][];
}

const greenhouse = 'greenhouse-vent-controller';
const bench = 'bench-supply-monitor';

const greenhouseCommon: PinMapRow[] = [
  { pin: 'A4', signal: 'Sensor SDA (2.2 kΩ pull-up to 5 V)', function: 'i2c_sda', drivenAtVolts: 5 },
  { pin: 'A5', signal: 'Sensor SCL (2.2 kΩ pull-up to 5 V)', function: 'i2c_scl', drivenAtVolts: 5 },
  { pin: 'D9', signal: 'Actuator IN1', function: 'pwm' },
  { pin: 'D10', signal: 'Actuator IN2', function: 'pwm' },
];
const greenhouseTail: PinMapRow[] = [
  { pin: 'D2', signal: 'Vent button (10 kΩ pull-up)', function: 'ext_interrupt', drivenAtVolts: 5 },
  { pin: 'D13', signal: 'Status LED', function: 'digital_out' },
];

export const demoPinMaps: DemoPinMap[] = [
  {
    project: greenhouse,
    board: 'Rev A',
    part: 'atmega328p',
    supplyVolts: 5,
    author: 'ilse-marrow',
    on: '2026-03-10',
    rows: [
      ...greenhouseCommon,
      // The Rev A mistake (erratum E1): A6 has no output driver.
      { pin: 'A6', signal: 'Relay module IN', function: 'digital_out' },
      ...greenhouseTail,
    ],
  },
  {
    project: greenhouse,
    board: 'Rev B',
    part: 'atmega328p',
    supplyVolts: 5,
    author: 'ilse-marrow',
    on: '2026-05-28',
    rows: [
      ...greenhouseCommon,
      { pin: 'D7', signal: 'Relay module IN', function: 'digital_out' },
      // 47 kΩ / 10 kΩ from the 12 V input: 14 V at most gives 2.46 V.
      { pin: 'A6', signal: '12 V sense (47 kΩ / 10 kΩ divider)', function: 'analog_in', drivenAtVolts: 2.46 },
      ...greenhouseTail,
    ],
  },
  {
    project: bench,
    board: 'Rev A',
    part: 'rp2040',
    supplyVolts: 3.3,
    author: 'ilse-marrow',
    on: '2026-08-15',
    rows: [
      { pin: 'GP4', signal: 'Sensor SDA (I²C0)', function: 'i2c_sda', drivenAtVolts: 3.3 },
      { pin: 'GP5', signal: 'Sensor SCL (I²C0)', function: 'i2c_scl', drivenAtVolts: 3.3 },
      { pin: 'GP6', signal: 'Display SDA (I²C1)', function: 'i2c_sda', drivenAtVolts: 3.3 },
      { pin: 'GP7', signal: 'Display SCL (I²C1)', function: 'i2c_scl', drivenAtVolts: 3.3 },
      { pin: 'GP13', signal: 'Trip reset button (internal pull-up)', function: 'digital_in' },
      // 5 V through 22 kΩ / 33 kΩ: 3.0 V at the pin.
      { pin: 'GP14', signal: '"Output on" input (22 kΩ / 33 kΩ divider)', function: 'digital_in', drivenAtVolts: 3 },
      { pin: 'GP15', signal: 'Relay module IN', function: 'digital_out' },
    ],
  },
];

// avr-gcc places .data at 0x800100 on the ATmega328P, .bss right after it.
const AVR_DATA = 0x800100;
const avr = (data: number, text: number, bss: number): [string, number, number][] => [
  ['.data', data, AVR_DATA],
  ['.text', text, 0],
  ['.bss', bss, AVR_DATA + data],
  ['.comment', 17, 0],
  ['.note.gnu.avr.deviceinfo', 64, 0],
  ['.debug_aranges', 1208, 0],
  ['.debug_info', 41_236, 0],
  ['.debug_abbrev', 9_874, 0],
  ['.debug_line', 15_402, 0],
];

const RP_FLASH = 0x1000_0000;
const RP_RAM = 0x2000_0000;
const rp2040 = (text: number, rodata: number, data: number, bss: number): [string, number, number][] => [
  ['.boot2', 256, RP_FLASH],
  ['.text', text, RP_FLASH + 256],
  ['.rodata', rodata, RP_FLASH + 256 + text],
  ['.binary_info', 32, RP_FLASH + 256 + text + rodata],
  ['.data', data, RP_RAM],
  ['.bss', bss, RP_RAM + data],
  ['.heap', 2048, RP_RAM + data + bss],
  ['.stack_dummy', 2048, 0x2004_0000],
  ['.ARM.attributes', 46, 0],
  ['.comment', 77, 0],
];

export const demoBuilds: DemoBuild[] = [
  {
    project: greenhouse,
    part: 'atmega328p',
    label: 'v0.9 first season',
    builtOn: '2026-03-20',
    changeNote: 'First firmware for Rev A: vent rule, fan rule, serial settings.',
    author: 'ilse-marrow',
    bootloaderBytes: 512,
    file: 'vent-controller.ino.elf',
    sections: avr(612, 24_510, 1_190),
  },
  {
    project: greenhouse,
    part: 'atmega328p',
    label: 'v0.10 strings in flash',
    builtOn: '2026-04-02',
    changeNote: 'Moved the serial menu strings to flash with F(): .data shrinks, a little more code.',
    author: 'ilse-marrow',
    bootloaderBytes: 512,
    file: 'vent-controller.ino.elf',
    sections: avr(286, 24_842, 1_190),
  },
  {
    project: greenhouse,
    part: 'atmega328p',
    label: 'v0.11 fixed-point humidity',
    builtOn: '2026-05-10',
    changeNote: 'Dropped floating-point printf: humidity and temperature in tenths, printed as integers.',
    author: 'juniper-okoye',
    bootloaderBytes: 512,
    file: 'vent-controller.ino.elf',
    sections: avr(280, 21_236, 1_190),
  },
  {
    project: greenhouse,
    part: 'atmega328p',
    label: 'v1.0 Rev B',
    builtOn: '2026-06-05',
    changeNote: 'BOARD_REV_B: relay on D7, 12 V sense on A6, homing after reset.',
    author: 'ilse-marrow',
    bootloaderBytes: 512,
    file: 'vent-controller.ino.elf',
    sections: avr(298, 22_604, 1_214),
  },
  {
    project: bench,
    part: 'rp2040',
    label: 'proto-1',
    builtOn: '2026-08-10',
    changeNote: 'Prototype firmware: sensor polling, display, USB log.',
    author: 'ilse-marrow',
    bootloaderBytes: 0,
    file: 'bench_monitor.elf',
    sections: rp2040(38_912, 9_820, 4_216, 3_560),
  },
  {
    project: bench,
    part: 'rp2040',
    label: 'proto-2 trip on core 1',
    builtOn: '2026-08-24',
    changeNote: 'Over-current trip moved to core 1 with its own sample loop.',
    author: 'ilse-marrow',
    bootloaderBytes: 0,
    file: 'bench_monitor.elf',
    sections: rp2040(40_228, 9_820, 4_232, 5_608),
  },
  {
    project: bench,
    part: 'rp2040',
    label: 'proto-3 font subset',
    builtOn: '2026-09-06',
    changeNote: 'Display font cut to digits, units and a few letters.',
    author: 'ilse-marrow',
    bootloaderBytes: 0,
    file: 'bench_monitor.elf',
    sections: rp2040(40_236, 3_364, 4_232, 5_608),
  },
];

/** The build's report as `size -A <file>` prints it (demo numbers). */
export function sizeReportA(file: string, sections: [string, number, number][]): string {
  const width = Math.max(...sections.map(([name]) => name.length), 7) + 2;
  const lines = [
    `${file}  :`,
    `${'section'.padEnd(width)}${'size'.padStart(8)}${'addr'.padStart(12)}`,
    ...sections.map(
      ([name, size, addr]) => `${name.padEnd(width)}${String(size).padStart(8)}${String(addr).padStart(12)}`,
    ),
    `${'Total'.padEnd(width)}${String(sections.reduce((acc, [, size]) => acc + size, 0)).padStart(8)}`,
  ];
  return `${lines.join('\n')}\n\n\n`;
}

async function partBySlug(tx: Tx, slug: string) {
  const [row] = await tx.select().from(parts).where(eq(parts.slug, slug));
  if (!row) throw new Error(`demo checks: part ${slug} is not seeded (seedParts runs first)`);
  return { ...row, profile: row.profile as PartProfile };
}

async function projectBySlug(tx: Tx, slug: string) {
  const [row] = await tx.select({ id: projects.id }).from(projects).where(eq(projects.slug, slug));
  if (!row) throw new Error(`demo checks: project ${slug} missing`);
  return row.id;
}

const noon = (date: string) => new Date(`${date}T12:00:00Z`);

export async function seedDemoChecks(tx: Tx, id: (login: string) => number): Promise<void> {
  for (const map of demoPinMaps) {
    const projectId = await projectBySlug(tx, map.project);
    const part = await partBySlug(tx, map.part);
    const [board] = await tx
      .select({ id: boardRevisions.id })
      .from(boardRevisions)
      .where(and(eq(boardRevisions.projectId, projectId), eq(boardRevisions.label, map.board)));
    if (!board) throw new Error(`demo checks: ${map.project} has no board ${map.board}`);
    const [row] = await tx
      .insert(pinMaps)
      .values({
        projectId,
        boardRevisionId: board.id,
        partId: part.id,
        supplyVolts: map.supplyVolts === null ? null : String(map.supplyVolts),
        rows: map.rows,
        currentRevision: 1,
        createdAt: noon(map.on),
        updatedAt: noon(map.on),
      })
      .returning({ id: pinMaps.id });
    const fields = {
      supplyVolts: map.supplyVolts === null ? '' : String(map.supplyVolts),
      rows: map.rows.map((r) => JSON.stringify(r)),
    };
    await tx.insert(revisions).values({
      subject: 'pin_map',
      subjectId: row!.id,
      projectId,
      number: 1,
      parentNumber: null,
      authorId: id(map.author),
      message: `Pin map of the ${part.name} on ${map.board}`,
      fields,
      contentHash: contentHash(fields),
      origin: 'create',
      createdAt: noon(map.on),
    });
  }

  for (const build of demoBuilds) {
    const projectId = await projectBySlug(tx, build.project);
    const part = await partBySlug(tx, build.part);
    const reportText = sizeReportA(build.file, build.sections);
    const parsed = parseSizeReport(reportText);
    const memory = part.profile.memory!;
    const use = memoryUse(parsed, {
      architecture: architectureOf(part),
      capacities: { flashBytes: memory.flash!.bytes, ramBytes: memory.sram.bytes },
      bootloaderBytes: build.bootloaderBytes,
    });
    await tx.insert(firmwareBuilds).values({
      projectId,
      partId: part.id,
      label: build.label,
      builtOn: build.builtOn,
      changeNote: build.changeNote,
      reportFormat: parsed.format,
      reportText,
      sections: parsed,
      flashUsed: use.flashUsed,
      ramUsed: use.ramUsed,
      bootloaderBytes: build.bootloaderBytes,
      createdBy: id(build.author),
      createdAt: noon(build.builtOn),
    });
  }
}
