/**
 * Demo errata, lessons and discussions for the bench supply monitor
 * (db/demo/write-ups/bench-supply-monitor.ts). Everything here is invented.
 *
 * The project has one board revision, Rev A. Three of its errata happened on the perfboard
 * prototype before Rev A, which is not a board revision: they affect no listed board and are
 * fixed in Rev A, so a reader who picks Rev A sees them as fixed there, not as open defects.
 */
import type { DemoContributions, DemoErratum, DemoErratumFields } from '../types';
import { benchSupplyMonitor } from '../write-ups/bench-supply-monitor';

// --- E1: sense wires on the current pads -----------------------------------------------------

const kelvinBase: DemoErratumFields = {
  title: "Prototype: current reads 19 % high, sense wires share the shunt's current joints",
  category: 'footprint-layout',
  severity: 'major',
  status: 'workaround',
  affected: [],
  fixedIn: null,
  refdes: ['R1', 'U2'],
  parts: ['10 mΩ shunt resistor', 'INA219-class current monitor'],
  pins: [],
  symptom: `On the perfboard prototype the current reading was consistently 19 % high at every current: 1.43 A where the bench meter in series said 1.20 A, and 5.95 A for 5.00 A. The voltage reading was within 10 mV of the meter, so the sensor itself and its I²C set-up were not the problem.`,
  cause: `The prototype's shunt **R1** was a two-terminal 10 mΩ resistor, and the sense wires to the monitor **U2** were soldered into the same joints as the heavy current wires. About 1.9 mΩ of solder joint and copper sat inside the measurement, in series with the 10 mΩ the firmware thought it was measuring: 1.9 / 10 is exactly the 19 %. At these values a single millimetre of 4 mm wide 1 oz copper, about 0.12 mΩ, is already more than 1 %.`,
  workaround: `On a two-terminal shunt, solder the sense wires to the very ends of the resistor body, inside the current joints, and keep them away from the current path. On the prototype this cut the error from 19 % to 6 %. What remains can be calibrated out against a meter, but only for that one board and wiring.`,
  fix: '',
};

const kelvinFix = `Rev A uses a four-terminal 10 mΩ, 3 W shunt. The sense traces leave its two small sense pads as a pair, run away from the current path, and reach the monitor through 10 Ω resistors with 100 nF across the inputs, as the monitor's datasheet suggests for filtering.`;

const senseAtCurrentPads: DemoErratum = {
  tags: ['current-sense', 'footprint'],
  revisions: [
    {
      author: 'ilse-marrow',
      daysAgo: 146.2,
      message: 'Prototype reads 19 % high: the sense wires share the current joints',
      fields: kelvinBase,
    },
    {
      author: 'ilse-marrow',
      daysAgo: 102.5,
      message: 'Fixed in Rev A: four-terminal shunt with Kelvin sense traces',
      fields: {
        ...kelvinBase,
        status: 'fixed_later',
        fixedIn: 'Rev A',
        fix: kelvinFix,
      },
    },
    {
      author: 'ilse-marrow',
      daysAgo: 64.4,
      message: 'Calibration confirms the fix: 0.4 % before the trim',
      fields: {
        ...kelvinBase,
        status: 'fixed_later',
        fixedIn: 'Rev A',
        fix: `${kelvinFix} Calibrated against the bench meter, Rev A reads within 0.4 % before any trim, against 19 % on the prototype.`,
      },
    },
  ],
};

// --- E2: 5 V into GP14 -----------------------------------------------------------------------

const fiveVoltBase: DemoErratumFields = {
  title: `Prototype: the supply's 5 V "output on" signal destroyed GP14`,
  category: 'logic-level',
  severity: 'critical',
  status: 'workaround',
  affected: [],
  fixedIn: null,
  refdes: ['U1'],
  parts: ['RP2040'],
  pins: ['GP14'],
  symptom: `With USB unplugged and the bench supply's output on, the prototype's power LED glowed faintly, although nothing was meant to power the board. By the time a meter was on it, **GP14** read high whatever the supply's "output on" signal did, with or without USB power. The rest of the board still worked, which made the dead pin easy to overlook.`,
  cause: `The supply's rear accessory socket gives a 5 V signal for its "output on" lamp, and the prototype wired it straight to **GP14**. The RP2040 is not 5 V tolerant: its I/O runs from IOVDD at 3.3 V, and no pin may go more than 0.5 V above IOVDD. The signal drove current through the pin's protection diode into the 3.3 V rail, enough to back-power the board with USB unplugged, and the pin did not survive it.`,
  workaround: `Put a divider between the signal and the pin: 22 kΩ from the signal to **GP14** and 33 kΩ from GP14 to ground bring 5.0 V down to 3.0 V, and 5.5 V to 3.3 V, well above the 2.0 V the pin needs to read high. The 13 kΩ source impedance is no problem for a signal that changes a few times an hour. A board that has already had 5 V on a pin should be treated as damaged and replaced.`,
  fix: '',
};

const fiveVoltOnGp14: DemoErratum = {
  tags: ['5v-tolerance', 'level-shifting'],
  revisions: [
    {
      author: 'ilse-marrow',
      daysAgo: 134.4,
      message: '5 V into GP14 killed the pin on the prototype',
      fields: fiveVoltBase,
    },
    {
      author: 'ilse-marrow',
      daysAgo: 102.5,
      message: 'Fixed in Rev A: divider on the board',
      fields: {
        ...fiveVoltBase,
        status: 'fixed_later',
        fixedIn: 'Rev A',
        refdes: ['U1', 'R4', 'R5'],
        fix: `Rev A has the 22 kΩ / 33 kΩ divider on the board, as **R4** and **R5**, right at the accessory input, so the 5 V signal never reaches a trace that leads anywhere else. The Hardware section's "output on" input explains the values. Anything else from a 5 V world that is ever added goes through a divider or a level shifter too.`,
      },
    },
  ],
  comments: [
    {
      author: 'juniper-okoye',
      daysAgo: 133.8,
      body: 'Ouch. Did the other pins on the dead board survive? I would test every GPIO before trusting it as a spare.',
    },
    {
      author: 'ilse-marrow',
      daysAgo: 133.5,
      body: 'Only GP14 is dead; a loop-back test on all the others passes. It stays in the drawer anyway, labelled, because I would never remember which pin it was.',
    },
  ],
};

// --- E3: ground loop through USB -------------------------------------------------------------

const groundLoopBase: DemoErratumFields = {
  title: 'Prototype: current reads 20–30 % low when the device under test is on USB',
  category: 'power',
  severity: 'major',
  status: 'workaround',
  affected: [],
  fixedIn: null,
  refdes: ['R1', 'U2'],
  parts: ['10 mΩ shunt resistor', 'INA219-class current monitor'],
  pins: [],
  symptom: `With the device under test plugged into the same laptop as the monitor, the current reading was 20 to 30 % low: 0.31 A where the bench meter in series said 0.42 A. The number changed when a USB cable was moved, and went back to 0.42 A as soon as the device's own USB cable was unplugged.`,
  cause: `The prototype measured current in the **negative** lead, between the output terminal and the monitor's ground. The laptop joins the device's ground and the monitor's ground through the two USB cables, so part of the return current took that path instead of the negative lead and never passed the shunt **R1**. How much depended on the resistance of the cables, which is why moving one changed the reading.`,
  workaround: `On the prototype, unplug the device's own USB cable while measuring, or put a USB isolator in the monitor's USB lead so the monitor's ground is no longer joined to the laptop's. Either way, check the reading once against a meter in series before trusting it.`,
  fix: '',
};

const groundLoopViaUsb: DemoErratum = {
  tags: ['ground-loop', 'current-sense'],
  revisions: [
    {
      author: 'ilse-marrow',
      daysAgo: 120.4,
      message: 'Current reads low when the device under test shares the USB ground',
      fields: groundLoopBase,
    },
    {
      author: 'ilse-marrow',
      daysAgo: 102.5,
      message: 'Fixed in Rev A: high-side shunt',
      fields: {
        ...groundLoopBase,
        status: 'fixed_later',
        fixedIn: 'Rev A',
        fix: `Rev A puts the shunt on the **high side**, between the relay contacts and the output's positive terminal. Every milliamp the device draws has to pass it, whatever path the return current takes. For devices that share the laptop's ground a USB isolator is still useful, because it keeps the return current out of the USB cables altogether.`,
      },
    },
  ],
};

// --- E4: the trip depends on the firmware ----------------------------------------------------

const tripNeedsFirmware: DemoErratum = {
  tags: ['current-sense', 'watchdog'],
  revisions: [
    {
      author: 'ilse-marrow',
      daysAgo: 79.5,
      message: 'Writing the Postmortem: nothing trips if core 0 hangs',
      fields: {
        title: 'Over-current trip depends on the firmware: a hung core 0 never opens the relay',
        category: 'bom-part-choice',
        severity: 'major',
        status: 'workaround',
        affected: ['Rev A'],
        fixedIn: null,
        refdes: ['U2', 'K1'],
        parts: ['INA219-class current monitor', 'RP2040', 'SRD-05VDC relay module'],
        pins: ['GP15'],
        symptom: `Not seen in use, but found while writing the Postmortem: if the firmware on core 0 stops running, nothing opens the relay, and the output stays connected at whatever current the supply delivers. Halting core 0 from the debugger with 3 A flowing and the trip set at 2 A left the relay closed until the debugger let go.`,
        cause: `The INA219-class monitor **U2** has no alert output, so the only thing that compares the current with the limit is the sampling loop on core 0 (Firmware, "The trip"). A hang in that loop, a stuck I²C transaction or a crash would leave **GP15** where it was, and the relay module holds its contacts as long as its input stays high.`,
        workaround: `Keep the bench supply's own current limit set to what the device under test needs, as the caution in the Overview says: the monitor is a second line of defence, not the first. For unattended soak tests, also build the firmware with the RP2040's watchdog enabled, so a hung core 0 resets the chip; after a reset GP15 is an input with its default pull-down, and the relay drops out.`,
        fix: `A trip that doesn't need the firmware: a comparator across the shunt that opens the relay by itself, or a current monitor with an alert output wired to the relay driver. It is on the Overview's to-do list for a next board; Rev A stays as it is.`,
      },
    },
  ],
  comments: [
    {
      author: 'bram-tolliver',
      daysAgo: 60.2,
      body: 'Would a monitor with an alert pin fit the same footprint, so Rev A boards could be upgraded?',
    },
    {
      author: 'ilse-marrow',
      daysAgo: 59.7,
      body: "Not the ones I looked at: the alert pin needs a pad the board doesn't have, and the relay driver would need a second input. A small comparator board on the shunt's sense pads is the more likely route for Rev A owners.",
    },
  ],
};

export const benchSupplyContributions: DemoContributions = {
  slug: benchSupplyMonitor.slug,
  errata: [senseAtCurrentPads, fiveVoltOnGp14, groundLoopViaUsb, tripNeedsFirmware],
  lessons: [
    {
      author: 'ilse-marrow',
      daysAgo: 145,
      body: 'A shunt of a few milliohms needs four terminals and sense traces that carry no current: one millimetre of copper in the sense path is already more than 1 %.',
      tags: ['current-sense', 'footprint'],
      errata: [1],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 133,
      body: 'Anything from a 5 V world that touches an RP2040 pin goes through a divider or a level shifter, even a "signal" that only lights a lamp.',
      tags: ['5v-tolerance', 'level-shifting'],
      errata: [2],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 119,
      body: 'Measure current on the high side whenever something else may share the ground, and USB always does.',
      tags: ['ground-loop', 'current-sense'],
      errata: [3],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 79,
      body: "A protective trip that depends on firmware is only as good as the firmware, so keep the supply's own current limit set and give the trip a path that works without code.",
      tags: ['watchdog', 'current-sense'],
      errata: [4],
    },
  ],
  proposals: [],
  followers: [],
};
