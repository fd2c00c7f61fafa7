/**
 * Demo write-up: a greenhouse vent controller on a Nano-footprint ATmega328P board. Everything
 * here is invented. Bodies are built from shared blocks, so each revision differs from the one
 * before only where the author really changed something, and a diff shows just that.
 */
import type { DemoProject } from '../types';

const repo = 'https://git.example.org/ilse-marrow/greenhouse-vent-controller';

// --- Overview --------------------------------------------------------------------------------

const overviewIntro = `## What it does

The controller lives in a lean-to greenhouse against a south-facing wall. Every two seconds it reads air temperature and humidity, and from those it decides two things: how far to open the roof vent, and whether to run the extraction fan. The vent is pushed by a small 5 V linear actuator; the fan is an ordinary 230 V AC inline fan, switched by a relay module.

Everything runs on a **Nano-footprint ATmega328P board** (the common 32-pin one with A6 and A7 brought out) plugged into a carrier board of my own. The carrier holds the sensor connector, an H-bridge for the actuator, the header for the relay module, the 5 V supply and the screw terminals.`;

const overviewMains = `> **Mains voltage.** The fan side of this project switches 230 V AC. In my build it sits in a closed, earthed enclosure with its own compartment, and it was wired and tested by a qualified electrician — not by me. A greenhouse is a damp place: follow your local electrical codes for protection, enclosure rating and cable, and have the mains side done by someone licensed to do that work. Nothing on the low-voltage carrier board touches mains.`;

const overviewBehaviour = `## How it behaves

- The vent opens a step at a time while it is above **26 °C** and closes a step at a time below **23 °C**. The 3 K gap is the hysteresis that stops it hunting around a single threshold.
- The fan runs above 30 °C *or* 85 % relative humidity, and stops once it is below 27 °C *and* 75 %.
- A push button on the lid forces the vent open for an hour — for watering days.
- If the sensor stops answering, the vent goes half open and the board LED blinks. Half open is the least bad guess in both July and January.
- Once a minute it prints a log line over USB serial; an old laptop in the shed keeps them.`;

const overviewStatusRevA = `## Status

Two Rev A boards run in the greenhouse, each with one bodge wire, because the relay drive had to move off A6. Rev B, with that fixed and a better 5 V regulator, is at the board house.`;

const overviewStatusSeason = `## Status

A Rev B board has run the greenhouse since June 2026, through the hot weeks of July and the first frosts, without a reset I didn't cause myself. Rev A boards still work with one bodge wire and a lower supply voltage — the board revision notes and the Postmortem say how.`;

const overviewWhere = `## Where things are

Schematic, board files, firmware and a season of log lines are in the [project repository](${repo}).`;

// --- Hardware --------------------------------------------------------------------------------

const hardwareCarrier = `## Carrier board

The Nano-style board plugs into two 15-pin female headers on a 70 × 60 mm two-layer carrier. The carrier takes **12 V DC** from a closed DIN-rail supply in the mains compartment and makes 5 V for everything else. Only low voltage ever reaches this board.`;

const pinRows = {
  header: `| Signal | Board pin | ATmega328P | Notes |
|---|---|---|---|
| Sensor SDA | A4 | PC4 (SDA) | 2.2 kΩ pull-up to 5 V |
| Sensor SCL | A5 | PC5 (SCL) | 2.2 kΩ pull-up to 5 V |
| Actuator IN1 | D9 | PB1 (OC1A) | Timer1 PWM |
| Actuator IN2 | D10 | PB2 (OC1B) | Timer1 PWM |`,
  relayRevA: `| Relay module IN | A6 | ADC6 | **does not work**: analog input only; bodge to D7 |`,
  relayRevB: `| Relay module IN | D7 | PD7 | moved from A6, see the Postmortem |
| 12 V sense | A6 | ADC6 | 47 kΩ / 10 kΩ divider: an analog-only job, which A6 can do |`,
  footer: `| Vent button | D2 | PD2 (INT0) | 10 kΩ pull-up, 100 nF to ground |
| Status LED | D13 | PB5 | the board's own LED |`,
};

const hardwarePinsRevA = [
  '### Pin assignment (Rev A)',
  [pinRows.header, pinRows.relayRevA, pinRows.footer].join('\n'),
].join('\n\n');

const hardwarePinsRevB = [
  '### Pin assignment (Rev B)',
  [pinRows.header, pinRows.relayRevB, pinRows.footer].join('\n'),
].join('\n\n');

const hardwareSensor = (pullUps: string) => `### Sensor

An SHT3x-class temperature and humidity sensor sits on a small board in a ventilated radiation shield, 1.5 m from the enclosure on a four-core cable. I²C was never meant for cables that long, so the bus runs at 50 kHz with ${pullUps} pull-ups on the carrier, and the sensor end has 100 nF and 10 µF across its supply. The sensor runs at 5 V; this class of part accepts 2.15–5.5 V, but check your breakout, as some carry a 3.3 V regulator and a level shifter.`;

const hardwareActuator = `### Actuator

A 5 V micro linear actuator with 50 mm of stroke and built-in end-of-travel switches pushes the vent through a short lever. It draws about 300 mA while moving and 650 mA at stall. One channel of a small dual H-bridge driver (1.5 A per channel, current limit set to 1 A) drives it from D9 and D10, and the firmware ramps the duty cycle over 300 ms so the start doesn't dip the 5 V rail.`;

const hardwareRelay = `### Fan relay

The fan is switched by an SRD-05VDC relay module: 5 V coil, transistor driver and flyback diode on the module, contacts rated 10 A at 250 V AC for a fan that draws 0.2 A. The module sits on standoffs in the mains compartment; only a three-wire low-voltage lead (5 V, ground, IN) passes through a grommet to the carrier. These modules leave little clearance between the coil side and the contacts, which is one more reason the mains compartment is closed and was wired by the electrician.`;

const hardwarePowerRevA = `### Power

Rev A makes 5 V with an AMS1117-style LDO in SOT-223. That was a mistake: while the actuator moves the 5 V load is about 400 mA, and the regulator turns (12 − 5) V × 0.4 A = 2.8 W into heat. The Postmortem has the rest.`;

const hardwarePowerRevB = `### Power

Rev B makes 5 V with a 2 A synchronous buck converter. At the 400 mA the board draws while the actuator moves, it loses about 0.25 W, where the Rev A LDO had to burn (12 − 5) V × 0.4 A = 2.8 W.

| Load on the 5 V rail | Current |
|---|---|
| Nano-style board and sensor | 30 mA |
| Relay module, coil on | 75 mA |
| Actuator, moving | 300 mA |
| **Worst normal case** | **about 400 mA** |`;

// --- Firmware --------------------------------------------------------------------------------

const firmwareLoop = `## Structure

There is no scheduler library: the firmware is a cooperative loop. Each task is a plain function with its own period, called when \`millis()\` says it is due, and none of them blocks for more than a few milliseconds. Periods and timestamps are 16-bit, which is enough for a one-minute task and keeps the wrap-around arithmetic cheap.

\`\`\`c
struct task {
  void (*run)(void);
  uint16_t period_ms;
  uint16_t last_ms;
};

static struct task tasks[] = {
  { read_sensor,   2000, 0 },
  { poll_button,     10, 0 },
  { control_fan,   5000, 0 },
  { control_vent, 10000, 0 },
  { log_line,     60000, 0 },
};

void loop(void) {
  uint16_t now = (uint16_t)millis();
  for (uint8_t i = 0; i < sizeof tasks / sizeof tasks[0]; i++) {
    if ((uint16_t)(now - tasks[i].last_ms) >= tasks[i].period_ms) {
      tasks[i].last_ms = now;
      tasks[i].run();
    }
  }
  wdt_reset();
}
\`\`\``;

const firmwareHysteresis = `## Hysteresis

Temperatures are kept in hundredths of a degree in an \`int16_t\`, so the control code has no floating point at all. The sensor's raw readings are converted with the datasheet formulas in integer arithmetic, and the vent moves one of its four steps per control period:

\`\`\`c
/* T = -45 + 175 * raw / 65535 and RH = 100 * raw / 65535, both scaled by 100 */
reading.centi_c  = (int16_t)(-4500 + (int32_t)(17500UL * raw_t / 65535UL));
reading.centi_rh = (uint16_t)(10000UL * raw_rh / 65535UL);

static void control_vent(void) {
  if (!reading.valid) {
    vent_move_to(VENT_HALF);
    return;
  }
  if (reading.centi_c > settings.open_above && vent_step < VENT_STEPS)
    vent_move_to(vent_step + 1);
  else if (reading.centi_c < settings.close_below && vent_step > 0)
    vent_move_to(vent_step - 1);
  /* between the two thresholds the vent stays where it is */
}
\`\`\``;

const firmwareWatchdog = `## Watchdog

The watchdog is set to two seconds and reset once per pass of the loop. The usual way an AVR program hangs is an I²C transaction waiting forever on a bus that something has upset, and a 1.5 m sensor cable next to a fan motor is good at upsetting buses. After a watchdog reset the first log line says so:

\`\`\`c
void setup(void) {
  uint8_t cause = MCUSR;  /* WDRF, BORF, EXTRF, PORF; some bootloaders clear it first */
  MCUSR = 0;
  wdt_disable();
  /* ... pins, I2C, sensor ... */
  log_reset_cause(cause);
  wdt_enable(WDTO_2S);
}
\`\`\``;

const firmwareMemoryEarly = `## Memory

With the bootloader, the board leaves **30,720 bytes** of the 32 KB flash for the program, and the current build uses 28,960 of them: 94 %. The log line prints temperatures with \`%.1f\`, which needs the floating-point version of avr-libc's printf. That is the first thing to go when I need room.`;

const firmwareMemoryBody = `With the bootloader, the board leaves **30,720 bytes** of the 32 KB flash for the program; for AVR, flash used is \`.text\` plus \`.data\`. In August the build stood at 97 %:

\`\`\`text
   text    data     bss     dec     hex filename
  29618     256     912   30786    7842 vent.elf
\`\`\`

Most of the fat was the floating-point printf. avr-libc's default \`printf\` has no \`%f\`, so to print \`%.1f\` I had linked the full version with \`-Wl,-u,vfprintf -lprintf_flt -lm\`. The log line now formats hundredths with a small integer routine, the link flags are gone, and the build is 1,518 bytes smaller:

\`\`\`text
   text    data     bss     dec     hex filename
  28102     254     912   29268    7254 vent.elf
\`\`\`

That is 28,356 bytes of flash (92 %) and room for the next feature.`;

const firmwareMemoryAugust = `## Memory\n\n${firmwareMemoryBody}`;

const firmwareFlashBudget = `## Flash budget\n\n${firmwareMemoryBody} Static RAM, \`.data\` plus \`.bss\`, is 1,166 of the 2,048 bytes.`;

const firmwareSettings = `## Settings

The thresholds live in EEPROM and can be changed over the serial port; \`show\` prints them like this:

\`\`\`ini
[vent]
open_above_c = 26.0
close_below_c = 23.0
steps = 4

[fan]
on_above_c = 30.0
on_above_rh = 85
off_below_c = 27.0
off_below_rh = 75
\`\`\``;

// --- Postmortem ------------------------------------------------------------------------------

const postmortemRelay = `## Rev A: the relay that never switched

**Symptom.** The fan never ran. The relay module's input LED never lit, and the pin measured 0 V whatever the firmware wrote to it.

**Cause.** I had drawn the relay driver input to **A6**. On the TQFP ATmega328P these boards use, ADC6 and ADC7 are inputs to the analog-to-digital converter and nothing else: no port register, no output driver, no pull-up. The board's header prints A6 and A7 right next to A0–A5, which *are* ordinary digital pins, and I drew the schematic from the header labels instead of the datasheet's pin descriptions. \`digitalWrite(A6, HIGH)\` compiles without a warning; it just can't do anything.

**Workaround on Rev A.** Cut the trace at the relay header, solder a wire from D7 (spare on Rev A) to the relay IN pad, and build the firmware with \`RELAY_PIN\` set to \`7\`.

**Fix.** Rev B routes the relay input to D7 and gives A6 a job it can do: measuring the 12 V input through a divider.`;

const postmortemRegulator = (watts: string, report: string) => `## Rev A: the regulator that ran hot

**Symptom.** On warm afternoons the board reset in the middle of a vent stroke. **bram-tolliver**, who built a Rev A board for his own cold frame, reported it first${report}.

**Cause.** The AMS1117-style LDO drops 12 V to 5 V. While the actuator moves, the 5 V load is about 400 mA, so the regulator dissipates (12 − 5) V × 0.4 A = ${watts} in a SOT-223 package on a small copper pour. Its tab passed 110 °C within one stroke; after a few strokes in a row the thermal limit cut in, the 5 V rail sagged, and the brown-out detector reset the ATmega328P.

**Workaround on Rev A.** Feed the carrier from 7.5 V instead of 12 V, which brings the dissipation down to about 1 W, warm but steady, or wire a small buck module in place of the LDO.

**Fix.** Rev B uses a 2 A synchronous buck converter, with about 0.25 W of loss at the same load.`;

const postmortemWentRight = (watchdog: string) => `## What went right

- The cooperative loop never needed more than it has; no task has missed its period by more than a few milliseconds.
- The 3 K hysteresis was right the first time: the vent moves a handful of times a day, not every ten seconds.
- ${watchdog}`;

const postmortemLessons = `## Lessons

1. Check every pin's capability in the datasheet's pin descriptions. A silkscreen label is a name, not a capability.
2. Work out a linear regulator's dissipation, (input voltage − output voltage) × current, before choosing its package. The current rating on the first page says nothing about whether the package can shed the heat.
3. Choose the supply voltage for the loads you actually have: a 5 V supply would have avoided the regulator problem altogether.
4. Leave room in flash. At 97 % every feature became a negotiation.`;

// --- Bill of materials -----------------------------------------------------------------------

const bomIntro = (rev: string) => `## Carrier board, ${rev}

Everything on or plugged into the low-voltage carrier. Reference designators match the schematic in the [repository](${repo}).`;

const bomHeader = `| Ref | Qty | Part | Value or rating | Notes |
|---|---|---|---|---|
| U1 | 1 | Nano-style ATmega328P board | 5 V, 16 MHz, TQFP with A6/A7 | in two 15-pin female headers |`;

const bomRegulatorRevA = `| U2 | 1 | AMS1117-style LDO, SOT-223 | 5 V, 1 A | runs hot, see the Postmortem |`;

const bomRegulatorRevB = `| U2 | 1 | Synchronous buck converter | 5 V, 2 A | replaces the Rev A LDO |
| L1 | 1 | Inductor | 10 µH, 3 A | for U2 |`;

const bomMiddle = `| U3 | 1 | Dual H-bridge driver | 1.5 A per channel | one channel used |
| U4 | 1 | SHT3x-class sensor breakout | I²C, 2.15–5.5 V | in the radiation shield |
| K1 | 1 | SRD-05VDC relay module | 5 V coil; contacts 10 A 250 V AC | in the mains compartment |
| M1 | 1 | Micro linear actuator | 5 V, 50 mm stroke | built-in end switches |`;

const bomPullUps = (qty: number) => `| R1, R2 | ${qty} | Resistor, 0805 | 2.2 kΩ | I²C pull-ups |`;

const bomDivider = `| R4, R5 | 2 | Resistor, 0805 | 47 kΩ and 10 kΩ | 12 V sense divider on A6 |`;

const bomTail = `| R3 | 1 | Resistor, 0805 | 10 kΩ | button pull-up |
| C1 | 1 | Capacitor, X7R 0805 | 100 nF | button filter |
| C2, C3 | 2 | Capacitor, electrolytic | 22 µF, 25 V | regulator input and output |
| J1, J2 | 2 | Screw terminal, 5.08 mm | 2-pole | 12 V in; actuator |
| J3, J4 | 2 | Pin header | 4-pole and 3-pole | sensor cable; relay module lead |`;

const bomShield = `| — | 1 | Radiation shield and 1.5 m four-core cable | — | for the sensor |`;

const bomMains = `## Not in this list

The mains side — the fan, its fuse, the DIN-rail 12 V supply, cable glands, the enclosure and the RCD protection — is left out on purpose. Specify it with your electrician, for your installation and your local codes.`;

const bomTable = (...rows: string[]) => rows.join('\n');

// --- Build log -------------------------------------------------------------------------------

const relayLogFirst = `Five Rev A boards arrived last week and two are assembled. Sensor, actuator and button all work on the first try. The fan relay does not: the relay module's input LED never lights and the relay never clicks, whatever the firmware does.

The module itself is fine, since it clicks when I touch its IN pin to 5 V. So the problem is on my side of the header. Tomorrow: the scope on the relay drive trace.`;

const relayLogUpdate = `**Update, next evening.** Found it, and it is embarrassing. The relay input is wired to **A6**, and on the ATmega328P in this package A6 is an analog input only: there is no digital output behind that pin at all. The datasheet says so plainly; I had gone by the header labels.

Bodge: cut the trace next to the relay header and run a wire from D7 to the relay IN pad. With \`RELAY_PIN\` set to 7 the relay clicks. Both assembled boards are bodged, and Rev B will route it properly.`;

const flashLog = (
  saved: string,
) => `Adding the humidity rule for the fan pushed the build to 29,874 of the 30,720 bytes the bootloader leaves us. The biggest single thing in there was the floating-point printf, linked in only so the log line could print \`%.1f\`.

I replaced it with a twelve-line routine that prints hundredths as a decimal and removed \`-lprintf_flt\` from the link flags. The build came out ${saved} bytes smaller: 28,356 bytes, 92 %. The log lines match the old ones except now and then in the last digit, because printf rounded and my routine truncates. I can live with 0.05 °C.`;

export const greenhouseVentController: DemoProject = {
  slug: 'greenhouse-vent-controller',
  owner: 'ilse-marrow',
  editors: ['juniper-okoye'],
  status: 'published',
  meta: [
    {
      author: 'ilse-marrow',
      daysAgo: 285,
      message: 'Create the project',
      title: 'Greenhouse vent controller',
      summary: 'Opens the greenhouse roof vent when it gets warm.',
      licence: 'unspecified',
      repoUrl: '',
      hazards: [],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 150,
      message: 'Choose CERN-OHL-S-2.0, link the repository and mark the mains fan',
      title: 'Greenhouse vent controller',
      summary:
        'Opens and closes a lean-to greenhouse roof vent from temperature and humidity, on a Nano-footprint ATmega328P board.',
      licence: 'CERN-OHL-S-2.0',
      repoUrl: repo,
      hazards: ['mains'],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 9,
      message: 'Summary: mention the fan and the two board revisions',
      title: 'Greenhouse vent controller',
      summary:
        'Opens and closes a lean-to greenhouse roof vent and runs a 230 V extraction fan from temperature and humidity, on a Nano-footprint ATmega328P board. Two board revisions, one bodge wire, one season of use.',
      licence: 'CERN-OHL-S-2.0',
      repoUrl: repo,
      hazards: ['mains'],
    },
  ],
  boards: [
    {
      label: 'Rev A',
      releasedOn: '2026-03-14',
      notes: `First run of five boards. Known issues:

- The relay driver input is on A6, which is analog input only: cut the trace, wire D7 to the relay IN pad and set \`RELAY_PIN\` to 7.
- The 5 V LDO overheats at the 400 mA the board draws while the actuator moves: run the carrier from 7.5 V, or fit a buck module.`,
    },
    {
      label: 'Rev B',
      releasedOn: '2026-06-02',
      notes: `Relay driver moved to D7; A6 now senses the 12 V input through a 47 kΩ / 10 kΩ divider. The 5 V regulator is upsized to a 2 A synchronous buck converter. Firmware: build with \`BOARD_REV_B\`.`,
    },
  ],
  sections: [
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 196,
          message: 'First version of the overview',
          title: 'Overview',
          body: [overviewIntro, overviewBehaviour, overviewStatusRevA, overviewWhere].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 140,
          message: 'Put the mains warning at the top',
          title: 'Overview',
          body: [overviewIntro, overviewMains, overviewBehaviour, overviewStatusRevA, overviewWhere].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 8,
          message: 'Status after the first full season',
          title: 'Overview',
          body: [overviewIntro, overviewMains, overviewBehaviour, overviewStatusSeason, overviewWhere].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 190,
          message: 'Describe the Rev A carrier',
          title: 'Hardware',
          body: [
            hardwareCarrier,
            hardwarePinsRevA,
            hardwareSensor('4.7 kΩ'),
            hardwareActuator,
            hardwareRelay,
            hardwarePowerRevA,
          ].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 150,
          message: 'Update for Rev B: relay on D7, 12 V sense on A6, buck regulator',
          title: 'Hardware',
          body: [
            hardwareCarrier,
            hardwarePinsRevB,
            hardwareSensor('4.7 kΩ'),
            hardwareActuator,
            hardwareRelay,
            hardwarePowerRevB,
          ].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 21,
          message: 'Sensor pull-ups are 2.2 kΩ, as in the pin table and the bill of materials',
          title: 'Hardware',
          body: [
            hardwareCarrier,
            hardwarePinsRevB,
            hardwareSensor('2.2 kΩ'),
            hardwareActuator,
            hardwareRelay,
            hardwarePowerRevB,
          ].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 185,
          message: 'Describe the firmware structure',
          title: 'Firmware',
          body: [firmwareLoop, firmwareHysteresis, firmwareWatchdog, firmwareMemoryEarly].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 110,
          message: 'Flash use after dropping the floating-point printf',
          title: 'Firmware',
          body: [firmwareLoop, firmwareHysteresis, firmwareWatchdog, firmwareMemoryAugust].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 14,
          message: 'Rename the memory heading, add static RAM and the settings dump',
          title: 'Firmware',
          body: [firmwareLoop, firmwareHysteresis, firmwareWatchdog, firmwareFlashBudget, firmwareSettings].join(
            '\n\n',
          ),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 170,
          message: 'Postmortem of Rev A',
          title: 'Postmortem',
          body: [
            postmortemRelay,
            postmortemRegulator('2.6 W', ''),
            postmortemWentRight(
              'The watchdog has not fired yet. Either the loop is sound or the watchdog is untested; the reset-cause log line will tell.',
            ),
          ].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 45,
          message: 'Add the lessons list',
          title: 'Postmortem',
          body: [
            postmortemRelay,
            postmortemRegulator('2.6 W', ''),
            postmortemWentRight(
              'The watchdog has not fired yet. Either the loop is sound or the watchdog is untested; the reset-cause log line will tell.',
            ),
            postmortemLessons,
          ].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 3,
          message: "Fix the dissipation figure (2.8 W), credit Bram's measurement, the season's watchdog count",
          title: 'Postmortem',
          body: [
            postmortemRelay,
            postmortemRegulator('2.8 W', ', with a thermocouple reading of the regulator tab to go with it'),
            postmortemWentRight(
              'The watchdog fired twice in the season, both times during a thunderstorm, and both times the log said why.',
            ),
            postmortemLessons,
          ].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 175,
          message: 'Bill of materials for Rev A',
          title: 'Bill of materials',
          body: [
            bomIntro('Rev A'),
            bomTable(bomHeader, bomRegulatorRevA, bomMiddle, bomPullUps(3), bomTail),
            bomMains,
          ].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 149,
          message: 'Rev B: buck converter, inductor and the 12 V sense divider',
          title: 'Bill of materials',
          body: [
            bomIntro('Rev B'),
            bomTable(bomHeader, bomRegulatorRevB, bomMiddle, bomPullUps(3), bomDivider, bomTail),
            bomMains,
          ].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 25,
          message: 'Two pull-ups, not three; add the radiation shield and cable',
          title: 'Bill of materials',
          body: [
            bomIntro('Rev B'),
            bomTable(bomHeader, bomRegulatorRevB, bomMiddle, bomPullUps(2), bomDivider, bomTail, bomShield),
            bomMains,
          ].join('\n\n'),
        },
      ],
    },
  ],
  logEntries: [
    {
      loggedOn: '2026-02-21',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 282.6,
          message: 'First bench evening',
          title: 'Breadboard: sensor, actuator and far too many jumper wires',
          body: `First evening with everything on the bench. The SHT3x-class sensor answers at address 0x44 and reads 19.8 °C against the room thermometer's 20 °C, which is good enough for a greenhouse. The micro actuator runs its full 50 mm in about 12 seconds at 300 mA and stops itself at both ends; at stall, with my thumb on the rod, the bench supply showed 650 mA.

Next: a carrier board, so this stops being a nest of jumpers. The plan is a Nano-style board in headers, the H-bridge on D9 and D10, the sensor on A4 and A5, and the relay module on one of the spare pins.

- [x] Sensor reads sensible values
- [x] Actuator end stops confirmed
- [ ] Carrier board layout`,
        },
      ],
    },
    {
      loggedOn: '2026-03-29',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 246.6,
          message: 'Rev A assembly',
          title: 'Rev A assembled — the fan relay never clicks',
          body: relayLogFirst,
        },
        {
          author: 'ilse-marrow',
          daysAgo: 245.2,
          message: 'Found the cause: A6 is analog input only',
          title: 'Rev A assembled — the fan relay never clicks',
          body: [relayLogFirst, relayLogUpdate].join('\n\n'),
        },
      ],
    },
    {
      loggedOn: '2026-04-18',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 226.7,
          message: "Bram's report, reproduced",
          title: "Bram's Rev A resets in the middle of a stroke",
          body: `**bram-tolliver** built one of the Rev A boards for his cold frame and reported that it resets in the middle of a vent stroke, but only in the afternoon. He sent a thermocouple reading: the 5 V regulator's tab at 118 °C after one full stroke.

I reproduced it on the bench with the actuator pushing against a spring. The arithmetic is not subtle: 12 V in, 5 V out, 400 mA while the actuator runs, so 2.8 W in a SOT-223 on a thumbnail of copper. Three strokes in a row and the regulator's thermal limit cuts in, the 5 V rail sags and the brown-out detector resets the chip.

For now both of us run Rev A from a 7.5 V supply, which brings it down to about 1 W. Rev B gets a buck converter.`,
        },
      ],
    },
    {
      loggedOn: '2026-06-20',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 163.6,
          message: 'Rev B installed',
          title: 'Rev B in the greenhouse',
          body: `Helped Ilse swap the Rev B board in today. No bodge wire this time: the relay is driven from D7 on the board itself, and A6 reads the 12 V input through its divider. It showed 12.1 V; the meter said 12.08 V.

The buck converter is barely warm after ten strokes in a row, where the Rev A regulator would have shut down long before. We left the vent thresholds alone and only built the firmware for the new board. The old Rev A board goes into the spares box with its bodge wire and a label saying so.`,
        },
      ],
    },
    {
      loggedOn: '2026-08-09',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 113.6,
          message: 'Flash notes',
          title: '97 % of flash, then 92 %',
          body: flashLog('1,158'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 100,
          message: 'Correct the saving: 29,874 − 28,356 is 1,518 bytes',
          title: '97 % of flash, then 92 %',
          body: flashLog('1,518'),
        },
      ],
    },
    {
      loggedOn: '2026-11-14',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 16.6,
          message: 'Season summary',
          title: 'End of the season',
          body: `The tomatoes are out and the greenhouse is down to overwintering geraniums, so this is a good moment to look back at the season's log.

- The vent moved 1,912 times between June and October, and the fan ran for 212 hours in total.
- The watchdog fired twice, both times during thunderstorms, and the vent carried on afterwards.
- The highest reading was 38.4 °C on 14 July, with the vent fully open and the fan running. The greenhouse needs a shade cloth more than it needs a better controller.

Next season: a second sensor at bench height, and a look at the flash budget before adding it.`,
        },
      ],
    },
  ],
};
