/**
 * Demo errata, lessons, proposals and discussions for the tide clock
 * (db/demo/write-ups/tide-clock.ts). Everything here is invented. Texts that stay the same from
 * one revision to the next are shared constants, so a diff shows only what really changed.
 */
import type { DemoContributions, DemoErratum, DemoErratumFields } from '../types';
import { tideClock } from '../write-ups/tide-clock';

// --- E1: LED ring data on GPIO35 -------------------------------------------------------------

const ringBase: DemoErratumFields = {
  title: 'LED ring stays dark: GPIO35 is input only',
  category: 'pin-capability',
  severity: 'major',
  status: 'open',
  affected: ['Rev A'],
  fixedIn: null,
  refdes: ['U1', 'J3'],
  parts: ['ESP32-WROOM'],
  pins: ['GPIO35'],
  symptom: `On Rev A the LED ring stays completely dark, while everything else works: Wi-Fi, the tide-table fetch and the hand. The serial log shows the LED driver refusing its data pin at start-up with an invalid-argument error; the firmware logs that and carries on without the ring.`,
  cause: `The ring's data line is routed to **GPIO35**. On the ESP32, GPIO34 to GPIO39 are input only: they have no output driver and no internal pull-up or pull-down, so the RMT peripheral can't drive them. GPIO35 was picked because it sat next to the ring connector **J3**, and the pin list was never checked.`,
  workaround: '',
  fix: `Rev B will move the ring's data line to an output-capable pin. Until then a Rev A board needs the bodge wire described under the workaround, and a firmware build that knows about the new pin.`,
};

const ringBodge = `Move the data line to **GPIO18**:

1. Cut the trace from GPIO35 to the data pin of the ring connector **J3**, close to J3.
2. Solder a short insulated wire from the module's GPIO18 pin to J3's data pin.
3. Set \`LED_DATA_GPIO\` to 18 in \`board.h\`, then build and flash.
4. Press the button on the rim: the ring lights for ten seconds.

At 3.3 V the first LED of the ring is marginal (E2) and may flicker on fresh cells.`;

const ringOnInputOnlyPin: DemoErratum = {
  tags: ['input-only-pin', 'bodge-wire'],
  revisions: [
    { author: 'juniper-okoye', daysAgo: 310.4, message: 'The ring stays dark on Rev A', fields: ringBase },
    {
      author: 'juniper-okoye',
      daysAgo: 309.7,
      message: 'Bodge wire to GPIO18',
      fields: { ...ringBase, status: 'workaround', pins: ['GPIO35', 'GPIO18'], workaround: ringBodge },
    },
    {
      author: 'juniper-okoye',
      daysAgo: 222.5,
      message: 'Fixed in Rev B',
      fields: {
        ...ringBase,
        status: 'fixed_later',
        fixedIn: 'Rev B',
        pins: ['GPIO35', 'GPIO18'],
        workaround: ringBodge,
        fix: `Rev B drives the ring from **GPIO18** through a 74HCT125-class buffer on the switched 5 V rail, which also cures the marginal first LED (E2). No bodge is needed, and the firmware for Rev B uses GPIO18 by default.`,
      },
    },
  ],
  comments: [
    {
      author: 'bram-tolliver',
      daysAgo: 300.2,
      body: 'Useful for anyone searching: the driver error at start-up names the pin it refused, so the serial log finds this in seconds. Worth reading it before reaching for the scope.',
    },
    {
      author: 'juniper-okoye',
      daysAgo: 299.8,
      body: 'Agreed. In my defence, the log was scrolling past at the time. It is now the first thing I read after a new board boots.',
    },
  ],
};

// --- E2: the first LED flickers at 3.3 V -----------------------------------------------------

const flickerBase: DemoErratumFields = {
  title: 'First LED of the ring flickers: 3.3 V data is below its input threshold',
  category: 'logic-level',
  severity: 'minor',
  status: 'open',
  affected: ['Rev A'],
  fixedIn: null,
  refdes: ['U1', 'J3'],
  parts: ['ESP32-WROOM', 'Addressable RGB LED ring, 24 LEDs'],
  pins: ['GPIO18'],
  symptom: `After the GPIO35 bodge (E1) the ring lights, but its first LED flickers now and then, showing a wrong colour for a frame, mostly on fresh cells. The other 23 LEDs are steady. Once the cells have run down to about 4.2 V under load the flicker stops.`,
  cause: `The ring runs straight from the cells, about 4.8 V when fresh, and its first LED wants at least 0.7 × its supply to read a high data bit: 3.36 V at 4.8 V. The ESP32's output reaches 3.3 V at best. Every LED after the first regenerates the data at its own supply voltage, which is why only the first one misbehaves, and why it behaves once 0.7 × the supply falls below 3.3 V.`,
  workaround: '',
  fix: `Rev B will pass the ring's data line through a buffer powered from the same rail as the ring, so the first LED sees a full-swing signal whatever the cells are doing.`,
};

const spareLedShifter = `Put one spare addressable LED in the data line ahead of the ring and power it through a small silicon diode (1N4148 class) from the ring supply. At about 4.1 V its threshold drops to roughly 2.9 V, which the ESP32 clears, and its output swings high enough for the ring's first LED at full voltage. Tell the firmware there are 25 LEDs and keep the first one dark. Tried on the spare Rev A board; the clock on the wall lived with the flicker until Rev B.`;

const firstLedFlickers: DemoErratum = {
  tags: ['level-shifting'],
  revisions: [
    { author: 'juniper-okoye', daysAgo: 309.6, message: 'First LED flickers after the bodge', fields: flickerBase },
    {
      author: 'juniper-okoye',
      daysAgo: 300.4,
      message: 'Workaround: a spare LED as a level shifter',
      fields: {
        ...flickerBase,
        status: 'workaround',
        workaround: spareLedShifter,
      },
    },
    {
      author: 'juniper-okoye',
      daysAgo: 222.5,
      message: 'Fixed in Rev B: HCT buffer on the 5 V rail',
      fields: {
        ...flickerBase,
        status: 'fixed_later',
        fixedIn: 'Rev B',
        workaround: spareLedShifter,
        fix: `Rev B runs the ring from a 5 V boost converter and passes the data through a 74HCT125-class buffer on that rail. The buffer reads anything above 2.0 V as high and drives a full 5 V swing, well above the 3.5 V the ring needs at 5 V.`,
      },
    },
  ],
};

// --- E3: servo on GPIO12, a strapping pin ----------------------------------------------------

const strappingBase: DemoErratumFields = {
  title: 'Boot loop with the dial board fitted: servo signal on strapping pin GPIO12',
  category: 'pin-capability',
  severity: 'critical',
  status: 'workaround',
  affected: ['Rev A'],
  fixedIn: null,
  refdes: ['U1', 'R101'],
  parts: ['ESP32-WROOM'],
  pins: ['GPIO12'],
  symptom: `On the bench the clock boots normally. Assembled, with the dial board connected, it boot-loops: the serial console shows the boot ROM failing to read the flash, over and over. Unplugging the dial board's ribbon cable makes it boot again, every time.`,
  cause: `**GPIO12** is a strapping pin: the ESP32 samples it at reset to choose the voltage of the flash supply. High selects 1.8 V, and the module's 3.3 V flash can't be read at that voltage. The servo signal is on GPIO12, and the dial board has a 10 kΩ pull-up, **R101**, on the servo line so the servo doesn't twitch at power-up. That pull-up overrides the chip's internal pull-down. On the bench, without the dial board, nothing pulled the pin up.`,
  workaround: `Remove **R101** from the dial board. Without it the servo twitches a little at power-up (E6), which does no harm. Burning the eFuse that fixes the flash voltage at 3.3 V also works, but it is permanent and every replacement module would need the same treatment, so we don't recommend it.`,
  fix: `Rev B will move the servo signal to a pin that is not sampled at reset. Until then, any Rev A board that is used with the dial board needs R101 removed before its first power-up.`,
};

const servoOnStrappingPin: DemoErratum = {
  tags: ['strapping-pin', 'connector-pinout'],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 296.4,
      message: 'Boot loop once the dial board is on',
      fields: strappingBase,
    },
    {
      author: 'juniper-okoye',
      daysAgo: 222.5,
      message: 'Fixed in Rev B: servo on GPIO25',
      fields: {
        ...strappingBase,
        status: 'fixed_later',
        fixedIn: 'Rev B',
        pins: ['GPIO12', 'GPIO25'],
        fix: `Rev B moves the servo signal to **GPIO25**, which is not sampled at reset, and drives it through the 74HCT125-class buffer, so nothing on the dial board can reach a strapping pin any more. The firmware holds the line low while the 5 V rail is off.`,
      },
    },
  ],
  comments: [
    {
      author: 'odile-fenwick',
      daysAgo: 290.5,
      body: 'Thank you for saying plainly that the eFuse is one-way. That is the part people tend to learn the hard way.',
    },
    {
      author: 'juniper-okoye',
      daysAgo: 290.1,
      body: 'It nearly was the hard way here: I had the command typed before I thought about the spare modules in the drawer.',
    },
  ],
};

// --- E4: deep sleep at 3.6 mA ----------------------------------------------------------------

const sleepBase: DemoErratumFields = {
  title: 'Deep sleep draws 3.6 mA: the USB-serial bridge never suspends',
  category: 'power',
  severity: 'major',
  status: 'workaround',
  affected: ['Rev A'],
  fixedIn: null,
  refdes: ['U3'],
  parts: ['USB-serial bridge', 'ESP32-WROOM'],
  pins: [],
  symptom: `Three fresh AA cells, fitted on 14 February, were flat after four weeks: the clock stopped with the hand at half tide. The power budget said more than a year. With a meter in series with the cells, the sleeping clock drew **3.6 mA** instead of the few tens of microamps the budget assumed.`,
  cause: `The ESP32 module in deep sleep drew about 10 µA, as its datasheet promises. Nearly all the rest was the USB-serial bridge **U3**, powered from the 3.3 V rail like everything else: with no USB cable connected it never enters its suspend state, so it sits at its operating current day and night. The budget had counted the module and forgotten the rest of the board.`,
  workaround: `Cut the bridge's supply trace and solder a two-pin jumper across the cut. Leave the jumper off while the clock is on the wall, and put it back only to program the board over USB. With the jumper off, the sleeping clock draws a few tens of microamps, mostly the module and the LDO.`,
  fix: `Rev B will power the bridge from the USB connector instead of the 3.3 V rail, so that without a cable it has no supply at all, with resistors in its serial lines so the module can't power it through them either. The sleep current gets measured on a complete board this time.`,
};

const sleepCurrent: DemoErratum = {
  tags: ['deep-sleep', 'power-budget'],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 260.4,
      message: 'Cells flat after four weeks',
      fields: sleepBase,
    },
    {
      author: 'juniper-okoye',
      daysAgo: 222.5,
      message: 'Fixed in Rev B: the bridge is powered from USB only',
      fields: {
        ...sleepBase,
        status: 'fixed_later',
        fixedIn: 'Rev B',
        fix: `Rev B powers the bridge from the USB connector only, with 1 kΩ in its TX and RX lines so the module can't feed it through them. Without a cable it is unpowered and draws nothing; the whole clock sleeps at **27 µA**, most of it the module's RTC domain, the LDO and the battery divider.`,
      },
    },
  ],
};

// --- E5: Rev B silkscreen --------------------------------------------------------------------

const silkscreenLabel: DemoErratum = {
  tags: ['documentation'],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 205.2,
      message: 'TP2 still says IO12 on Rev B',
      fields: {
        title: 'Rev B silkscreen labels the servo test pad IO12; the signal comes from GPIO25',
        category: 'documentation',
        severity: 'cosmetic',
        status: 'wont_fix',
        affected: ['Rev B'],
        fixedIn: null,
        refdes: ['TP2'],
        parts: [],
        pins: ['GPIO25', 'GPIO12'],
        symptom: `On Rev B the test pad for the servo signal, **TP2**, is labelled \`IO12\` on the silkscreen. The signal on it is the buffered servo pulse from GPIO25, and a scope probe on TP2 shows the expected pulses, so nothing is wrong electrically. The label just sends you to the wrong line of the pin table.`,
        cause: `When the servo moved from GPIO12 to GPIO25 for Rev B, the net was renamed in the schematic, but the test pad's label is a separate text item on the silkscreen layer and kept the old name. The design-rule check has no way of knowing that a free text label is out of date.`,
        workaround: `None needed: read **TP2** as the servo signal, and trust the pin table in the Hardware section over the board's labels. If you work on the board often, a fine marker over the label does the job.`,
        fix: `Not worth a board run on its own. The label is corrected in the layout files in the repository, so any future run carries the right name; the Rev B boards that exist keep the old one.`,
      },
    },
  ],
};

// --- E6: the hand flicks when the 5 V rail comes up ------------------------------------------

const handFlicks: DemoErratum = {
  tags: [],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 199.3,
      message: 'The hand flicks every time the rail comes up, on Rev B too',
      fields: {
        title: 'Hand flicks by a few degrees each time the servo is powered',
        category: 'power',
        severity: 'minor',
        status: 'open',
        affected: ['Rev A', 'Rev B'],
        fixedIn: null,
        refdes: ['M1', 'U5'],
        parts: ['Hobby servo', '74HCT125-class buffer'],
        pins: ['GPIO25', 'GPIO27'],
        symptom: `Each time the clock powers the servo to move the hand, the hand first jumps by two or three degrees, about half a scale mark, and then settles where it should. On the wall it shows as a small flick every ten minutes. It started on Rev A once the pull-up was removed (E3), and Rev B does the same.`,
        cause: `Not known for certain. The servo's own controller seems to drive its motor briefly while its supply rises, before it has seen a valid pulse: the firmware holds the signal low while the rail is off, and the first pulse goes out only once the rail is up. The same jump shows on a bare servo horn, so it is not the hand's balance.`,
        workaround: `None that works yet. Sending the first pulse as soon as the rail is enabled, instead of after a settling delay, made no difference, and neither did a 470 µF capacitor on the servo supply. Powering the servo permanently would cure it but costs milliamps in deep sleep, which undoes the point of Rev B.`,
        fix: `Still open. The next things to try are a second servo model, to see whether this is one servo's habit, and after that a soft start on the servo's supply. Comments from anyone who has solved this on a battery-powered clock are welcome.`,
      },
    },
  ],
  comments: [
    {
      author: 'odile-fenwick',
      daysAgo: 120.6,
      body: "Mine does the same on Rev B. With a different servo from the same drawer the flick is smaller but still there, so I don't think it is only one servo's habit.",
    },
    {
      author: 'juniper-okoye',
      daysAgo: 118.9,
      body: 'Thanks, that is useful to know before I buy a box of servos. Soft start it is, then.',
    },
  ],
};

export const tideClockContributions: DemoContributions = {
  slug: tideClock.slug,
  errata: [ringOnInputOnlyPin, firstLedFlickers, servoOnStrappingPin, sleepCurrent, silkscreenLabel, handFlicks],
  lessons: [
    {
      author: 'juniper-okoye',
      daysAgo: 309,
      body: 'GPIO34–39 on the ESP32 are input only and have no internal pull-ups: fine for a button or a battery divider, useless for LED data.',
      tags: ['input-only-pin'],
      errata: [1],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 300,
      body: "A 3.3 V pin can't reliably drive LEDs powered from 5 V, because their data input wants 0.7 × their supply, 3.5 V. Put an HCT buffer on the LED rail.",
      tags: ['level-shifting'],
      errata: [2],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 295,
      body: "A pull-up on a daughterboard is part of the main board's design: check what every connector brings to the strapping pins at reset.",
      tags: ['strapping-pin', 'connector-pinout'],
      errata: [3],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 259,
      body: "Measure sleep current on the whole board with every part fitted; the module's datasheet figure is only the module.",
      tags: ['deep-sleep', 'power-budget'],
      errata: [4],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 204,
      body: 'After moving a signal to another pin, search the silkscreen for the old name too, because the labels are what the next person with a probe trusts.',
      tags: ['silkscreen', 'documentation'],
      errata: [5],
    },
  ],
  proposals: [
    {
      kind: 'new_erratum',
      author: 'odile-fenwick',
      daysAgo: 8.3,
      message: 'After a cell change during a Wi-Fi outage the clock showed low water until the next morning',
      status: 'open',
      payload: {
        title: 'After a cell change with Wi-Fi down, the clock has no time until the next daily fetch',
        category: 'firmware',
        severity: 'minor',
        status: 'open',
        affected: ['Rev B'],
        fixedIn: null,
        refdes: [],
        parts: ['ESP32-WROOM'],
        pins: [],
        symptom: `I changed the cells on my Rev B clock during a router outage. Wi-Fi came back about an hour later, but the clock still didn't know the time: the hand sat at the left end of the scale, low water, all evening, and the ring showed nonsense when I pressed the button. It came right by itself the next morning.`,
        cause: `I haven't read all of the firmware, but it looks as if a failed time sync at power-up is not retried until the next daily fetch. Without the time, the table copy in flash is no use either, so the clock can't fall back to it or to the harmonic estimate.`,
        workaround: `Take the cells out and put them back once Wi-Fi is working again. The clock syncs at power-up and shows the right tide within a few seconds. Changing cells only while the network is up avoids the problem altogether.`,
        fix: '',
      },
      comments: [
        {
          author: 'juniper-okoye',
          daysAgo: 7.2,
          body: "Thanks, Odile. I can reproduce it with the router unplugged: a failed sync at power-up should be retried on every ten-minute wake until it works. I'll accept this once I've checked whether Rev A behaves the same, so the affected boards are right.",
        },
      ],
    },
  ],
  followers: ['odile-fenwick'],
};
