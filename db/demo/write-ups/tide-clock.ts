/**
 * Demo write-up: a battery wall clock on an ESP32 module that shows the tide. Everything here
 * is invented, the harbour included. Bodies are built from shared blocks, so each revision
 * differs from the one before only where the author really changed something.
 */
import type { DemoProject } from '../types';

const repo = 'https://git.example.org/juniper-okoye/tide-clock';

// --- Overview --------------------------------------------------------------------------------

const overviewWhat = `## What it is

A round wall clock for our hallway, which is a ten-minute walk from a tidal harbour. It doesn't tell the time. Its single hand shows the **height of the tide**, low water on the left and high water on the right, and a ring of 24 LEDs around the dial shows **where we are in the tide cycle**, with high water at the top. It runs on three AA cells and an ESP32-WROOM module.`;

const overviewReading = `## Reading it

- The hand sweeps 150° across a scale from 0 to 5 m above chart datum. It moves every ten minutes, when the clock wakes from deep sleep.
- The ring lights for ten seconds on the hour, or when you press the button on the rim. One LED marks now; the LEDs between now and the next high or low water glow faintly, so "about two hours to high water" can be read at a glance.
- If the clock hasn't managed to fetch tide tables for more than two days, the LED for now blinks: the hand is showing the harmonic estimate instead.`;

const overviewData = (accuracy: string) => `## Where the tide comes from

Once a day at 03:00 the clock wakes its Wi-Fi, sets its time and fetches the next seven days of high and low waters from a tide-table service. Between those points it interpolates with the usual cosine curve. If the fetch fails it keeps using the table it has, and once that runs out it falls back to a five-constituent harmonic estimate computed on the clock, ${accuracy}. Sources are in the [repository](${repo}).`;

const overviewStatusRevA = `## Status

Rev A is on the wall with two bodge wires. Battery life is still being measured.`;

const overviewStatusRevB = `## Status

Rev B has been on the wall since early May. Rev A lasted four weeks on a set of cells; Rev B sleeps at 27 µA and should last well over a year.`;

const overviewStatusNow = `## Status

Rev B has run since early May on the same three AA cells, which still read 1.31 V each under load. The projection says well over a year, and the Postmortem says what Rev A taught me on the way.`;

// --- Hardware --------------------------------------------------------------------------------

const hardwareModule = `## Module and carrier

An ESP32-WROOM module (the classic dual-core ESP32) sits on a round 60 mm carrier behind the dial, with a USB-serial bridge for programming, a low-quiescent 3.3 V LDO, and connectors for the dial board. The dial board carries the servo connector and the LED ring connector.

Power is three AA alkaline cells: 4.5 V fresh, usable down to about 3.5 V. The LDO needs only 0.15 V of headroom at the module's Wi-Fi peaks, which is what makes three cells work.`;

const hardwarePinsRevA = `## Pins (Rev A)

| Signal | GPIO | Notes |
|---|---|---|
| LED ring data | GPIO35 | **wrong**: GPIO34–39 are input only; bodged to GPIO18 |
| Servo signal | GPIO12 | **wrong**: a strapping pin, and the dial board's pull-up stops the boot |
| Ring and servo power | GPIO27 | P-MOSFET switch from the cells; 10 kΩ keeps it off in deep sleep |
| Button | GPIO39 | external 100 kΩ pull-up; wakes the chip from deep sleep |
| Battery sense | GPIO34 | ADC1, 1 MΩ / 680 kΩ divider, 100 nF at the pin |`;

const hardwarePinsRevB = `## Pins (Rev B)

| Signal | GPIO | Notes |
|---|---|---|
| LED ring data | GPIO18 | through a 74HCT125-class buffer on the 5 V rail |
| Servo signal | GPIO25 | through the same buffer |
| 5 V enable | GPIO27 | boost converter with load disconnect; a 10 kΩ pull-down keeps it off in deep sleep |
| Button | GPIO39 | external 100 kΩ pull-up; wakes the chip from deep sleep |
| Battery sense | GPIO34 | ADC1, usable while Wi-Fi is on; 1 MΩ / 680 kΩ divider, 100 nF at the pin |
| 32.768 kHz crystal | GPIO32, GPIO33 | steadier time in deep sleep |

Rev A had the ring data on GPIO35 and the servo on GPIO12; the Postmortem says why neither worked.`;

const hardwareInputOnlyNote = `GPIO34 and GPIO39 are input-only pins too, which is all a battery divider and a button need. They have no internal pull-ups either, hence the external 100 kΩ on the button.`;

const hardwarePowerRevA = `## Power (Rev A)

The ring and the servo run straight from the cells through a P-MOSFET switch that is off while the module sleeps: addressable LEDs draw about 0.6 mA each even when dark, so a ring of 24 can't stay powered. The USB-serial bridge runs from the 3.3 V rail, like everything else.`;

const hardwarePowerRevB = `## Power (Rev B)

The ring and the servo now run from a 5 V boost converter with true load disconnect, enabled only while the hand moves or the ring is lit. At 5 V the ring's data input needs 3.5 V to read high, more than a 3.3 V pin gives, so both signals pass through a 74HCT125-class buffer, whose inputs read anything above 2.0 V as high. The firmware holds both lines low whenever the 5 V rail is off, so the module never feeds the unpowered buffer through its input diodes.

The USB-serial bridge is powered from the USB connector only, with 1 kΩ in its TX and RX lines. Without a cable it is unpowered and draws nothing.

| State | Rev A | Rev B |
|---|---|---|
| Deep sleep | 3.6 mA | 27 µA |
| Awake, moving the hand | 190 mA | 210 mA |
| Wi-Fi fetch, about 4 s | 120 mA average | 120 mA average |`;

// --- Firmware --------------------------------------------------------------------------------

const firmwareWake = `## One wake at a time

The clock spends almost all its life in deep sleep. Each wake, every ten minutes on a timer or from the button on GPIO39, runs the same short sequence and goes back to sleep, usually within 150 ms:

1. Work out the tide height and phase for now from the stored table, or from the harmonic estimate.
2. If the hand has to move by more than 1°, switch on the servo's power, send pulses for 400 ms, and switch it off again.
3. On the hour, or after a button press, light the ring for ten seconds.
4. Once a day at 03:00, connect to Wi-Fi, set the clock and fetch the next seven days of high and low waters.
5. Arm the timer and the button, and sleep.

The table, at most 30 extremes of six bytes each, lives in RTC memory, which survives deep sleep, with a copy in flash for when the cells are changed.`;

const firmwareInterpolation = `## Between high and low water

Between two extremes the height follows the usual cosine curve:

\`\`\`c
/* Height at t between one extreme (t0, h0) and the next (t1, h1). */
static float height_between(time_t t, time_t t0, float h0, time_t t1, float h1) {
  float x = (float)(t - t0) / (float)(t1 - t0);  /* 0 at t0, 1 at t1 */
  return h0 + (h1 - h0) * (1.0f - cosf((float)M_PI * x)) / 2.0f;
}
\`\`\``;

const firmwareHarmonic = `## Offline: a harmonic estimate

When the table runs out, the clock sums five tidal constituents. The speeds are the standard astronomical ones; the amplitudes and phases for our harbour come from a least-squares fit, done on a laptop against a year of published predictions, with the epoch's equilibrium arguments folded into the phases.

\`\`\`c
static const struct constituent {
  double speed_deg_h;       /* standard */
  float amp_mm, phase_deg;  /* fitted for our harbour */
} model[] = {
  { 28.9841042, 1480.0f, 112.0f },  /* M2 */
  { 30.0000000,  510.0f, 148.0f },  /* S2 */
  { 28.4397295,  290.0f,  95.0f },  /* N2 */
  { 15.0410686,   95.0f, 210.0f },  /* K1 */
  { 13.9430356,   80.0f, 201.0f },  /* O1 */
};

static float tide_mm(double hours_since_epoch) {
  double h = MEAN_LEVEL_MM;
  for (size_t i = 0; i < sizeof model / sizeof model[0]; i++) {
    double deg = fmod(model[i].speed_deg_h * hours_since_epoch - model[i].phase_deg, 360.0);
    h += model[i].amp_mm * cos(deg * M_PI / 180.0);
  }
  return (float)h;
}
\`\`\`

The nodal corrections are left out: they change slowly over the 18.6-year lunar cycle and move the M2 amplitude by up to about 4 %, so I refit once a year instead.`;

const firmwareHarmonicExpected = `I expect it to be good to half an hour; the test is still to come.`;

const firmwareHarmonicResult = `In a week with the clock's Wi-Fi blocked on purpose, the estimate put every high water within 20 minutes and 12 cm of the published table. The build log has the numbers.`;

const firmwareRing = `## The ring

The RMT peripheral generates the LED timing, so the CPU only fills a buffer of 24 colours. The ring runs at about a tenth of full brightness: it hangs in a hallway, not a lighthouse.`;

// --- Enclosure and dial ----------------------------------------------------------------------

const enclosure = `## The case

The clock is a 300 mm disc of 9 mm birch plywood with a 40 mm deep rim behind it, cut with a jigsaw on a circle jig and glued up from two layers. The carrier and the battery holder screw to the back, and a slot at the bottom lets the cells out without taking the clock off the wall.

## The dial

The face is printed on heavy matte paper and glued on with spray adhesive:

- an arc of 150° across the top half with the height scale, 0 to 5 m in half-metre steps;
- the 24 LED positions around the edge, each a 5 mm hole behind a frosted acrylic ring, with *HW* at the top and *LW* at the bottom;
- the harbour's name and a small compass rose, because there was room.

The hand is a 3D-printed pointer with a brass counterweight on its short end. Balanced like that, the servo's gear train holds it in place by friction while the 5 V rail is off.

## Servo calibration

Hobby servos differ. Mine needs these pulse widths for the ends and the middle of the scale, measured with the hand fitted:

| Height | Hand angle | Pulse width |
|---|---|---|
| 0.0 m | −75° | 0.98 ms |
| 2.5 m | 0° | 1.52 ms |
| 5.0 m | +75° | 2.07 ms |

The firmware interpolates linearly between these three points, which keeps the hand within half a scale mark everywhere.

---

Paper template for the dial and the printed parts are in the [repository](${repo}).`;

// --- Postmortem ------------------------------------------------------------------------------

const postmortemRing = (bodgeDetail: string) => `## LED ring data on GPIO35

**Symptom.** The ring stayed dark. The LED driver refused the pin at start-up with an invalid-argument error, which my code logged and then ignored.

**Cause.** GPIO34 to GPIO39 on the ESP32 are input only: there is no output driver and no internal pull-up or pull-down. I picked GPIO35 because it was next to the ring connector.

**Rev A bodge.** Cut the trace to the ring connector and wire GPIO18 to its data pin.${bodgeDetail} At 3.3 V the first LED is marginal, since it wants 0.7 × its supply to read high, and it flickers on fresh cells.

**Fix.** Rev B drives the ring from GPIO18 through a 74HCT125-class buffer.`;

const postmortemStrapping = `## Servo on GPIO12, a strapping pin

**Symptom.** The clock booted on the bench and boot-looped on the wall. The serial console showed the boot ROM failing to read the flash, over and over.

**Cause.** GPIO12 is sampled at reset to choose the voltage of the flash supply. Held high, it selects 1.8 V, and the module's 3.3 V flash can't be read. The dial board has a 10 kΩ pull-up on the servo line so the servo doesn't twitch at power-up, and that pull-up beat the chip's internal pull-down. On the bench, without the dial board, nothing pulled the pin up.

**Rev A workaround.** Remove the pull-up on the dial board. Burning the eFuse that fixes the flash voltage at 3.3 V would also work, but it is permanent and every new module would need it.

**Fix.** Rev B moves the servo to GPIO25.`;

const postmortemSleep = (result: string) => `## Deep sleep at 3.6 mA

**Symptom.** Three fresh AA cells lasted four weeks. The budget said more than a year.

**Cause.** In deep sleep the module itself drew about 10 µA, as promised. The USB-serial bridge, powered from the 3.3 V rail, drew nearly all of the rest, and with no USB cable connected it never went into its suspend state. I had measured the module and forgotten the board.

**Fix.** Rev B powers the bridge from the USB connector only, with 1 kΩ in the serial lines so the module can't power it through them.${result}`;

const postmortemLessonList = `## Lessons

- Read the pin list before the pinout picture: GPIO34–39 are input only, and GPIO0, 2, 5, 12 and 15 are strapping pins with opinions about what they see at reset.
- A pull-up on a daughterboard is part of the main board's design. Check what every connector brings with it.
- Measure sleep current on the whole board, with every part fitted, before believing the module's datasheet figure.`;

const postmortemLessonExtra = `- Anything that stays powered while the rest of the board sleeps needs a line in the power budget, and a reason to be powered.`;

const postmortemToDo = `## Still to do

- [x] Move the servo off GPIO12
- [x] Power the USB-serial bridge from USB only
- [ ] Show spring and neap tides on the ring
- [ ] Refit the harmonic constants in January`;

// --- Build log -------------------------------------------------------------------------------

const ringLog = `Rev A boards arrived on the 10th, and tonight the first one is assembled. It sits on the bench without the dial board, servo and ring on flying leads. Wi-Fi connects, the table fetch works, the hand moves, and the LED ring stays completely dark.

The log has the answer, once I bother to read it: the LED driver refuses GPIO35 at start-up. GPIO34 to GPIO39 are input only on the ESP32. I even knew that; I just didn't look at the pin number when I routed the trace.`;

const ringLogUpdate = `**Next day.** Bodged: trace cut, a wire from GPIO18 to the ring's data pad, one define changed. The ring lights. The first LED flickers now and then on fresh cells, because 3.3 V is just below what it wants to see as high at 4.8 V, so Rev B gets a buffer.`;

const offlineLog = `To test the fallback I blocked the clock's Wi-Fi for a week, and emptied its stored table first, so the harmonic estimate is on its own from day one. Every evening I note the published high water time and height against what the clock shows, and next week this entry gets the numbers. The hand and the ring look no different, except that from the third day the LED for now blinks to say the clock is guessing.`;

const offlineLogResults = `| Day | Published high water | Clock's estimate | Time error | Height error |
|---|---|---|---|---|
| Monday | 06:12, 4.31 m | 06:27, 4.22 m | +15 min | −9 cm |
| Wednesday | 07:48, 4.02 m | 07:59, 3.94 m | +11 min | −8 cm |
| Friday | 09:31, 3.55 m | 09:14, 3.67 m | −17 min | +12 cm |
| Sunday | 11:20, 3.08 m | 11:40, 3.19 m | +20 min | +11 cm |

Within 20 minutes and 12 cm all week: good enough for a hallway, and the blinking LED says when the clock is guessing.`;

export const tideClock: DemoProject = {
  slug: 'tide-clock',
  owner: 'juniper-okoye',
  editors: [],
  status: 'published',
  meta: [
    {
      author: 'juniper-okoye',
      daysAgo: 330,
      message: 'Create the project',
      title: 'Tide clock',
      summary: 'A wall clock that shows the tide.',
      licence: 'unspecified',
      repoUrl: '',
      hazards: [],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 200,
      message: 'Choose CERN-OHL-W-2.0 and link the repository',
      title: 'Tide clock',
      summary:
        'A wall clock whose hand shows the tide height and whose LED ring shows the tide phase, on an ESP32 module.',
      licence: 'CERN-OHL-W-2.0',
      repoUrl: repo,
      hazards: [],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 15,
      message: 'Licence: say which part is under which; a fuller summary',
      title: 'Tide clock',
      summary:
        'A battery wall clock on an ESP32 module: a servo-driven hand shows the tide height and an LED ring the tide phase. It fetches tide tables over Wi-Fi once a day and falls back to a harmonic estimate offline.',
      licence: 'other',
      licenceOther: 'Board files CERN-OHL-W-2.0, firmware MIT, write-up CC-BY-4.0',
      repoUrl: repo,
      hazards: [],
    },
  ],
  boards: [
    {
      label: 'Rev A',
      releasedOn: '2026-01-10',
      notes: `First run of five boards. Known issues:

- LED ring data on GPIO35, which is input only. Bodge: wire GPIO18 to the ring's data pin (marginal at 3.3 V).
- Servo signal on GPIO12, a strapping pin: the pull-up on the dial board stops the module booting. Remove it.
- The USB-serial bridge runs from the 3.3 V rail and draws about 3.5 mA in deep sleep.`,
    },
    {
      label: 'Rev B',
      releasedOn: '2026-04-22',
      notes: `LED ring data on GPIO18 and servo signal on GPIO25, both through a 74HCT125-class buffer on a switched 5 V rail. USB-serial bridge powered from USB only. 32.768 kHz crystal on GPIO32 and GPIO33. Deep sleep 27 µA.`,
    },
  ],
  sections: [
    {
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 290,
          message: 'First version of the overview',
          title: 'Overview',
          body: [
            overviewWhat,
            overviewReading,
            overviewData('which I hope is good to half an hour'),
            overviewStatusRevA,
          ].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 190,
          message: 'Rev B on the wall; battery figures',
          title: 'Overview',
          body: [
            overviewWhat,
            overviewReading,
            overviewData('which I hope is good to half an hour'),
            overviewStatusRevB,
          ].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 12,
          message: 'Seven months on one set of cells',
          title: 'Overview',
          body: [
            overviewWhat,
            overviewReading,
            overviewData('good to about 20 minutes and 12 cm for our harbour'),
            overviewStatusNow,
          ].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 285,
          message: 'Describe the Rev A board',
          title: 'Hardware',
          body: [hardwareModule, hardwarePinsRevA, hardwarePowerRevA].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 195,
          message: 'Rev B: new pins, buffer, 5 V boost and crystal',
          title: 'Hardware',
          body: [hardwareModule, hardwarePinsRevB, hardwarePowerRevB].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 26,
          message: 'Note why GPIO34 and GPIO39 are fine where they are',
          title: 'Hardware',
          body: [hardwareModule, hardwarePinsRevB, hardwareInputOnlyNote, hardwarePowerRevB].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 280,
          message: 'Describe the firmware',
          title: 'Firmware',
          body: [firmwareWake, firmwareInterpolation, firmwareHarmonic, firmwareHarmonicExpected, firmwareRing].join(
            '\n\n',
          ),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 24,
          message: 'Harmonic estimate: results of the offline week',
          title: 'Firmware',
          body: [firmwareWake, firmwareInterpolation, firmwareHarmonic, firmwareHarmonicResult, firmwareRing].join(
            '\n\n',
          ),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 20,
          message: 'Describe the case, the dial and the servo calibration',
          title: 'Enclosure and dial',
          body: enclosure,
        },
      ],
    },
    {
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 240,
          message: 'Postmortem of Rev A',
          title: 'Postmortem',
          body: [postmortemRing(''), postmortemStrapping, postmortemSleep(''), postmortemLessonList].join('\n\n'),
        },
        {
          author: 'juniper-okoye',
          daysAgo: 6,
          message: 'Bodge details for Rev A owners; one more lesson and a to-do list',
          title: 'Postmortem',
          body: [
            postmortemRing(' Then set `LED_DATA_GPIO` to 18 in `board.h`.'),
            postmortemStrapping,
            postmortemSleep(
              " Deep sleep is now 27 µA, most of it the module's RTC domain, the LDO and the battery divider.",
            ),
            [postmortemLessonList, postmortemLessonExtra].join('\n'),
            postmortemToDo,
          ].join('\n\n'),
        },
      ],
    },
  ],
  logEntries: [
    {
      loggedOn: '2026-01-24',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 310.6,
          message: 'First Rev A on the bench',
          title: 'Rev A assembled: the ring stays dark',
          body: ringLog,
        },
        {
          author: 'juniper-okoye',
          daysAgo: 309.8,
          message: 'The bodge works, mostly',
          title: 'Rev A assembled: the ring stays dark',
          body: [ringLog, ringLogUpdate].join('\n\n'),
        },
      ],
    },
    {
      loggedOn: '2026-02-07',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 296.6,
          message: 'Boot loop',
          title: 'Boot loop once the dial board is on',
          body: `Everything worked on the bench, so today the clock went together properly: carrier behind the dial, dial board connected with its short ribbon. Power on, and a boot loop, the ROM failing to read flash over and over.

Unplugging the dial board cured it, which narrowed things down fast. The servo signal is on GPIO12, a strapping pin that sets the flash supply voltage at reset, and the dial board has a 10 kΩ pull-up on the servo line. High at reset means 1.8 V for a 3.3 V flash. Off came the pull-up. The servo twitches a little at power-up now, which I can live with until Rev B moves it to another pin.`,
        },
      ],
    },
    {
      loggedOn: '2026-03-15',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 260.6,
          message: 'Sleep current',
          title: 'Cells flat after four weeks',
          body: `The clock stopped this morning with the hand at half tide. Three AA cells, fitted on 14 February, flat after four weeks, when the budget said more than a year.

Meter in series with the cells, clock asleep: 3.6 mA. The module in deep sleep is about 10 µA, as it should be; lifting the USB-serial bridge's supply pin takes almost all the rest away. The bridge sits on the 3.3 V rail, and with no USB cable it never suspends.

For Rev B: power the bridge from the USB connector only. For now, its supply trace is cut, with a jumper to put back when I want to program the board.`,
        },
      ],
    },
    {
      loggedOn: '2026-05-09',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 205.6,
          message: 'Rev B installed',
          title: 'Rev B on the wall',
          body: `Rev B, released on 22 April, went on the wall today. No bodges: ring data on GPIO18 and servo on GPIO25, both through the HCT buffer on the switched 5 V rail; the bridge is powered from USB only; and a 32.768 kHz crystal keeps time while the module sleeps.

Deep sleep measures 27 µA. On Rev A the clock drifted by several minutes between daily time syncs, running on the internal RC oscillator in deep sleep. With the crystal it is under two seconds a day.`,
        },
      ],
    },
    {
      loggedOn: '2026-07-18',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 135.6,
          message: 'Offline test started',
          title: 'A week without Wi-Fi',
          body: offlineLog,
        },
        {
          author: 'juniper-okoye',
          daysAgo: 128.4,
          message: 'Add the results table',
          title: 'A week without Wi-Fi',
          body: [offlineLog, offlineLogResults].join('\n\n'),
        },
      ],
    },
    {
      loggedOn: '2026-11-21',
      revisions: [
        {
          author: 'juniper-okoye',
          daysAgo: 9.6,
          message: 'Seven months',
          title: 'Seven months on one set of cells',
          body: `Rev B has run since 9 May on the same three AA cells. Under load they read 1.31 V each today; by the discharge curve that leaves about half their capacity, which puts the projection at well over a year.

The daily fetch failed eleven times in the whole period, never two days running, so the blinking "guessing" LED has not come on outside the July test. The hand has moved about 21,000 times.

- [x] Seven months without touching it
- [ ] Refit the harmonic constants in January
- [ ] A spare set of cells in the drawer, just in case`,
        },
      ],
    },
  ],
};
