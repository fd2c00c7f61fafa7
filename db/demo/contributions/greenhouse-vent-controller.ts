/**
 * Demo errata, lessons, proposals and discussions for the greenhouse vent controller
 * (db/demo/write-ups/greenhouse-vent-controller.ts). Everything here is invented. Texts that
 * stay the same from one revision to the next are shared constants, so a diff shows only what
 * the author really changed.
 */
import type { DemoContributions, DemoErratum, DemoErratumFields, DemoProject, DemoRevision } from '../types';
import { greenhouseVentController } from '../write-ups/greenhouse-vent-controller';

/** A proposal to edit an erratum starts from its latest revision, as the editor would. */
function latestFields(erratum: DemoErratum): DemoErratumFields {
  const latest = erratum.revisions.at(-1);
  if (!latest) throw new Error('a demo erratum needs at least one revision');
  return latest.fields;
}

/** The current revision of a write-up section, found by its current title. */
function currentSection(project: DemoProject, title: string): DemoRevision {
  const current = project.sections.map((s) => s.revisions.at(-1)).find((r) => r?.title === title);
  if (!current) throw new Error(`${project.slug}: no section titled ${title}`);
  return current;
}

/** Rewrites the one paragraph (blocks split by a blank line) that starts with `start`. */
function replaceParagraph(body: string, start: string, rewrite: (paragraph: string) => string): string {
  const paragraphs = body.split('\n\n');
  const hits = paragraphs.filter((p) => p.startsWith(start));
  if (hits.length !== 1) throw new Error(`expected one paragraph starting "${start}", found ${hits.length}`);
  return paragraphs.map((p) => (p.startsWith(start) ? rewrite(p) : p)).join('\n\n');
}

// --- E1: relay input on A6 -------------------------------------------------------------------

const relaySymptom = `The extraction fan never runs. The relay module's input LED never lights and the relay never clicks, whatever the firmware writes to the relay pin. Measured at the IN pin of the relay lead header **J4**, the line sits at 0 V while the fan rule is active. The module itself is fine: it clicks as soon as its IN pin is touched to 5 V.`;

const relayCauseUnknown = `Not known yet. The module works on its own, so the fault is on the carrier's side of **J4**: either the drive trace from **U1** or the pin it is routed to. Next step is the scope on the trace while the firmware toggles the pin once a second.`;

const relayCause = `The relay input is routed to **A6**. On the TQFP ATmega328P used on Nano-style boards, ADC6 and ADC7 are inputs to the analog-to-digital converter and nothing else: no port register, no output driver, no pull-up. The header prints A6 and A7 next to A0–A5, which *are* digital pins, and the schematic was drawn from the header labels instead of the datasheet's pin descriptions. \`digitalWrite(A6, HIGH)\` compiles without a warning and does nothing.`;

const relayBodge = (cutAt: string) => `Move the relay drive to **D7**, which is spare on Rev A:

1. Unplug the board and take **U1** out of its headers.
2. On the bottom side, cut the trace between the A6 header pin and **J4** pin 3 (IN)${cutAt}. Check with a meter that A6 and J4 pin 3 no longer connect.
3. Tin J4 pin 3 on the bottom side.
4. Run a short insulated wire (30 AWG wire-wrap wire is easy to route) from the D7 header pin to J4 pin 3, and hold it down with a dot of glue.
5. Build the firmware with \`RELAY_PIN\` set to \`7\` and flash it.
6. Check: over the serial port, set \`on_above_c\` below room temperature. The module's LED lights and the relay clicks within five seconds. Set it back to 30.`;

const relayFixPlanned = `Rev B will route the relay input to D7 on the board itself, so no wire is needed, and give A6 a job it can do: measuring the 12 V input through a 47 kΩ / 10 kΩ divider. The firmware for Rev B will be built with \`BOARD_REV_B\`, which sets \`RELAY_PIN\` to 7.`;

const relayFixDone = `Rev B routes the relay input to D7 on the board itself, so no wire is needed, and gives A6 a job it can do: measuring the 12 V input through a 47 kΩ / 10 kΩ divider. Build the firmware for Rev B with \`BOARD_REV_B\`, which sets \`RELAY_PIN\` to 7.`;

const relayBase: DemoErratumFields = {
  title: 'Relay never switches: A6 is analog input only',
  category: 'pin-capability',
  severity: 'critical',
  status: 'open',
  affected: ['Rev A'],
  fixedIn: null,
  refdes: ['U1', 'J4', 'K1'],
  parts: ['ATmega328P', 'SRD-05VDC relay module'],
  pins: ['A6'],
  symptom: relaySymptom,
  cause: relayCauseUnknown,
  workaround: '',
  fix: '',
};

const relayNeverSwitches: DemoErratum = {
  tags: ['analog-only-pin', 'bodge-wire'],
  revisions: [
    { author: 'ilse-marrow', daysAgo: 246.5, message: 'The fan relay never clicks on Rev A', fields: relayBase },
    {
      author: 'ilse-marrow',
      daysAgo: 245.1,
      message: 'Cause found: A6 is analog input only; bodge wire from D7',
      fields: {
        ...relayBase,
        status: 'workaround',
        pins: ['A6', 'D7'],
        cause: relayCause,
        workaround: relayBodge(''),
        fix: relayFixPlanned,
      },
    },
    {
      author: 'ilse-marrow',
      daysAgo: 181.5,
      message: "Fixed in Rev B; where to cut the trace, from Bram's comment",
      fields: {
        ...relayBase,
        status: 'fixed_later',
        fixedIn: 'Rev B',
        pins: ['A6', 'D7'],
        cause: relayCause,
        workaround: relayBodge(', a couple of millimetres away from the J4 pad, where the trace runs clear of it'),
        fix: relayFixDone,
      },
    },
  ],
  comments: [
    {
      author: 'bram-tolliver',
      daysAgo: 236.3,
      body: 'Did the bodge on my board tonight, following the steps. One thing: on the bottom side the A6 trace runs right under the J4 pad for its last few millimetres, so cut it a little further back, or the knife lifts the pad. The relay clicks on D7 now.',
    },
    {
      author: 'ilse-marrow',
      daysAgo: 235.9,
      body: "Thanks, Bram, glad it clicks. I'll fold the *where to cut* part into step 2.",
    },
  ],
};

// --- E2: the regulator that ran hot ----------------------------------------------------------

const regulatorBase: DemoErratumFields = {
  title: 'Regulator overheats above about 400 mA: resets in the middle of a vent stroke',
  category: 'power',
  severity: 'major',
  status: 'workaround',
  affected: ['Rev A'],
  fixedIn: null,
  refdes: ['U2'],
  parts: ['AMS1117-style LDO, SOT-223'],
  pins: [],
  symptom: `On warm afternoons the board resets in the middle of a vent stroke, most often on the second or third stroke in a row. The first log line after the restart reports a brown-out reset. The regulator **U2** is too hot to touch after a single full stroke of the actuator. With the actuator idle it never happens.`,
  cause: `**U2**, an AMS1117-style LDO in SOT-223, drops the 12 V input to 5 V. While the actuator moves, the 5 V load is about 400 mA (board and sensor 30 mA, relay coil 75 mA, actuator 300 mA), so the regulator dissipates (12 − 5) V × 0.4 A = **2.8 W**. The small copper pour under its tab can't shed that: after a few strokes the regulator's thermal limit cuts in, the 5 V rail sags and the ATmega328P's brown-out detector resets it.`,
  workaround: `Run the carrier from **7.5 V** instead of 12 V. The dissipation drops to (7.5 − 5) V × 0.4 A = 1.0 W: warm, but steady through ten strokes in a row, and 7.5 V still leaves the LDO more than twice its dropout voltage. Use a supply rated for at least 1 A. Alternatively, remove U2 and wire a small 5 V buck module to its input, ground and output pads.`,
  fix: `Rev B will make 5 V with a switching converter instead of a linear regulator. A buck converter loses roughly 0.25 W at the same 400 mA load, about a tenth of what the LDO burns, and the input voltage stops mattering for heat.`,
};

const regulatorRunsHot: DemoErratum = {
  tags: ['regulator-thermal', 'power-budget'],
  reportedBy: 'bram-tolliver',
  revisions: [
    {
      author: 'ilse-marrow',
      daysAgo: 226.6,
      message: "Bram's report: resets during a vent stroke, reproduced on the bench",
      fields: regulatorBase,
    },
    {
      author: 'ilse-marrow',
      daysAgo: 181.4,
      message: 'Fixed in Rev B: 2 A synchronous buck converter',
      fields: {
        ...regulatorBase,
        status: 'fixed_later',
        fixedIn: 'Rev B',
        refdes: ['U2', 'L1'],
        fix: `Rev B replaces the LDO with a 2 A synchronous buck converter (**U2**, with a 10 µH inductor **L1**). At the 400 mA the board draws while the actuator moves it loses about 0.25 W, and on the bench it was barely warm after ten strokes in a row. Rev B runs from the 12 V supply as designed.`,
      },
    },
  ],
  comments: [
    {
      author: 'bram-tolliver',
      daysAgo: 226.2,
      body: "Thanks for writing this up so quickly. Mine has run from a 7.5 V wall supply since last night: eight strokes in a row this afternoon and no reset. The regulator is still warm enough that I wouldn't close the lid in July.",
    },
    {
      author: 'ilse-marrow',
      daysAgo: 225.8,
      body: 'Good to hear. Leave the lid vented for now; the real answer is the buck converter on Rev B.',
    },
    {
      author: 'juniper-okoye',
      daysAgo: 163.5,
      body: 'Rev B in the greenhouse today: ten strokes in a row and **U2** is barely above the temperature of the board around it.',
    },
  ],
};

// --- E3: C2 polarity mark ----------------------------------------------------------------------

const polarityBase: DemoErratumFields = {
  title: 'C2 polarity mark on the silkscreen is beside the negative pad',
  category: 'footprint-layout',
  severity: 'major',
  status: 'workaround',
  affected: ['Rev B'],
  fixedIn: null,
  refdes: ['C2'],
  parts: ['22 µF 25 V electrolytic capacitor'],
  pins: [],
  symptom: `Fitted the way the silkscreen shows, the 22 µF electrolytic **C2** on the 12 V input runs hot within a minute of power-up and starts to bulge; left on, it would vent. The board otherwise works, because C2 is only a reservoir capacitor, which makes the mistake easy to miss on a quick bench test.`,
  cause: `The capacitor footprint in our library prints the **+** mark beside pad 2, the negative pad. The square pad, pad 1, is the positive one and is the one connected to the 12 V net from **J1**. A capacitor fitted by the silkscreen has 12 V across it the wrong way round. C3 uses a different footprint and is marked correctly.`,
  workaround: `Ignore the **+** printed beside C2. Fit the capacitor with its stripe (the negative lead) on the **round** pad and the positive lead on the **square** pad, and check with a meter before the first power-up: the square pad reads 0 Ω to the positive terminal of J1. If a board has already been powered with C2 reversed, replace the capacitor even if it looks fine, because a reversed electrolytic loses capacitance and leaks.`,
  fix: `The footprint in the library is corrected. No new board run is planned, so existing boards keep the wrong mark and this erratum is the warning. Any future revision gets the corrected footprint.`,
};

const polarityMark: DemoErratum = {
  tags: ['footprint'],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 158.4,
      message: 'C2 fitted by the silkscreen got hot on the spare Rev B',
      fields: polarityBase,
    },
    {
      author: 'ilse-marrow',
      daysAgo: 157.9,
      message: 'Rev A has the same footprint (my boards were fitted by the pad shapes)',
      fields: { ...polarityBase, affected: ['Rev A', 'Rev B'] },
    },
  ],
};

// --- E4: vent position after a reset ---------------------------------------------------------

const ventPositionBase: DemoErratumFields = {
  title: 'Vent position lost after a reset: the firmware assumes the vent is closed',
  category: 'firmware',
  severity: 'minor',
  status: 'open',
  affected: ['Rev A', 'Rev B'],
  fixedIn: null,
  refdes: ['M1', 'U3'],
  parts: ['ATmega328P', 'Micro linear actuator, 5 V'],
  pins: ['D9', 'D10'],
  symptom: `After a watchdog reset during a thunderstorm in July, the vent stayed two steps open through a cool night while the log lines said \`vent 0/4\`. It only came right after the next hot afternoon, when the vent opened fully against its end switch and then closed again. Nothing else went wrong: sensor, fan and button carried on normally.`,
  cause: `\`vent_step\` lives in RAM and starts at 0, fully closed, after every reset. The actuator has no position feedback: its end-of-travel switches stop the motor but tell the board nothing, and the firmware moves it by timed steps on **D9** and **D10**. A reset with the vent open leaves the count and the real position apart, and the control rule never closes below step 0.`,
  workaround: '',
  fix: '',
};

const ventPositionLost: DemoErratum = {
  tags: ['watchdog'],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 139.2,
      message: 'Vent stayed open after the storm reset',
      fields: ventPositionBase,
    },
    {
      author: 'ilse-marrow',
      daysAgo: 131,
      message: 'Workaround: home the vent at start-up',
      fields: {
        ...ventPositionBase,
        status: 'workaround',
        workaround: `Home the vent at start-up. Firmware from the repository's main branch drives the actuator towards closed for 15 seconds, longer than the 12-second full stroke, lets its end switch stop it, and only then sets \`vent_step\` to 0 and starts the control loop. Homing calls \`wdt_reset()\` every 100 ms, so the two-second watchdog doesn't fire during it.`,
        fix: `Homing costs a closed vent for 15 seconds after every reset, which is harmless in a greenhouse. A real fix needs position feedback, for example an actuator with a potentiometer output read on a spare analog pin; that is not planned for the boards as they are.`,
      },
    },
  ],
};

// --- E5: relay clicks at power-up ------------------------------------------------------------

const relayClick: DemoErratum = {
  tags: [],
  revisions: [
    {
      author: 'ilse-marrow',
      daysAgo: 30.2,
      message: 'The fan runs for a second at every power-up',
      fields: {
        title: 'Fan runs for about a second at every power-up or reset',
        category: 'pin-capability',
        severity: 'minor',
        status: 'open',
        affected: ['Rev A', 'Rev B'],
        fixedIn: null,
        refdes: ['U1', 'J4', 'K1'],
        parts: ['ATmega328P', 'SRD-05VDC relay module'],
        pins: ['D7'],
        symptom: `The fan runs for about a second every time the board powers up or resets, then stops until the fan rule asks for it. It happens on Rev B and on bodged Rev A boards alike. The fan doesn't mind, but it is a relay operation the firmware never asked for, and the contacts switch mains each time.`,
        cause: `**D7** is a high-impedance input while the ATmega328P is held in reset and while the bootloader waits for an upload, about a second in all; the firmware only makes it an output in \`setup()\`. The relay module has no pull-down on its IN pin, so the 30 cm lead through the grommet floats and, we think, picks up enough to switch the module's transistor on. Not yet confirmed with the scope.`,
        workaround: `None tested yet. A 10 kΩ resistor from the IN pin of **J4** to ground, soldered on the back of the carrier, should hold the line low while D7 floats. It costs 0.5 mA while the relay is on, which D7 drives easily. If you try it, please add a comment with what you saw.`,
        fix: `If the pull-down works, it goes on the board next to J4 in any next revision. Until then the firmware can at least write D7 low as the very first thing in \`setup()\`, which shortens the click but can't remove the part that happens during reset and the bootloader.`,
      },
    },
  ],
  comments: [
    {
      author: 'juniper-okoye',
      daysAgo: 27.4,
      body: 'Tried the 10 kΩ on the spare Rev B: no click in twenty power-ups. Without it, the scope on IN shows the line wandering up to about 1.5 V during reset while the fan cable next to it is live.',
    },
    {
      author: 'ilse-marrow',
      daysAgo: 26.9,
      body: "That settles the cause. I'll fit one to the greenhouse board at the weekend, and then write it up as the workaround.",
    },
  ],
};

// --- E6: pull-up values in the documents -----------------------------------------------------

const pullUpDocs: DemoErratum = {
  tags: ['documentation', 'i2c-pull-ups'],
  revisions: [
    {
      author: 'juniper-okoye',
      daysAgo: 21.1,
      message: 'Schematics say 4.7 kΩ for the sensor pull-ups; the boards have 2.2 kΩ',
      fields: {
        title: 'Schematics gave the I²C pull-ups as 4.7 kΩ; the boards use 2.2 kΩ',
        category: 'documentation',
        severity: 'cosmetic',
        status: 'wont_fix',
        affected: ['Rev A', 'Rev B'],
        fixedIn: null,
        refdes: ['R1', 'R2'],
        parts: ['2.2 kΩ resistor, 0805'],
        pins: ['A4', 'A5'],
        symptom: `The sensor pull-ups **R1** and **R2** on A4 and A5 are 2.2 kΩ on every board we built and in the bill of materials, but the released schematics of both revisions say 4.7 kΩ, and until recently so did the Hardware section of this write-up. The bill of materials also listed three of them instead of two.`,
        cause: `The pull-ups were changed to 2.2 kΩ on the bench, when the 1.5 m sensor cable made the I²C edges too slow, and only the bill of materials was updated at the time. The schematic PDFs were exported before that change, and the Hardware text was written from the schematic.`,
        workaround: `Fit 2.2 kΩ, as the bill of materials says. With 4.7 kΩ the bus still worked on the bench at 50 kHz, but the rise time on the long cable is about twice as long and leaves little margin, so a board built from the schematic alone may give occasional sensor read errors.`,
        fix: `The Hardware section and the bill of materials are corrected. The schematic PDFs stay as they were released, so that they match the boards' fabrication files; this erratum is the correction for anyone reading them.`,
      },
    },
  ],
};

const errata = [relayNeverSwitches, regulatorRunsHot, polarityMark, ventPositionLost, relayClick, pullUpDocs];

// --- Proposals -------------------------------------------------------------------------------

const regulatorNow = latestFields(regulatorRunsHot);
const hardwareNow = currentSection(greenhouseVentController, 'Hardware');

export const greenhouseContributions: DemoContributions = {
  slug: greenhouseVentController.slug,
  errata,
  lessons: [
    {
      author: 'ilse-marrow',
      daysAgo: 240,
      body: 'Check the pin table before routing: A6 and A7 on the Nano-style board cannot drive anything.',
      tags: ['analog-only-pin'],
      errata: [1],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 44,
      body: '`digitalWrite(A6, HIGH)` compiles without a warning, so the compiler will never catch an ADC-only pin. A pin check against the datasheet will.',
      tags: ['adc-only-pin'],
      errata: [1],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 225,
      body: 'Work out (input − output) × current for a linear regulator before choosing its package: 2.8 W in a SOT-223 on a small copper pour trips its thermal limit within a few strokes.',
      tags: ['regulator-thermal', 'power-budget'],
      errata: [2],
    },
    {
      author: 'juniper-okoye',
      daysAgo: 157,
      body: 'Check every polarity mark on the silkscreen against the footprint pads before the first board run, because a wrong library footprint repeats itself in every revision.',
      tags: ['footprint'],
      errata: [3],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 130,
      body: 'An actuator without position feedback has no known position after a reset, so home it against its end stop before the first move.',
      tags: ['watchdog'],
      errata: [4],
    },
  ],
  proposals: [
    {
      kind: 'new_erratum',
      author: 'bram-tolliver',
      daysAgo: 12.3,
      message: 'New erratum: a reversed 12 V supply killed the regulator and the H-bridge on my Rev A',
      status: 'accepted',
      decidedBy: 'ilse-marrow',
      decidedDaysAgo: 10.2,
      payload: {
        title: 'No reverse-polarity protection on the 12 V input J1',
        category: 'power',
        severity: 'major',
        status: 'workaround',
        affected: ['Rev A', 'Rev B'],
        fixedIn: null,
        refdes: ['J1', 'U2', 'U3'],
        parts: ['AMS1117-style LDO, SOT-223', 'Dual H-bridge driver'],
        pins: [],
        symptom: `When I changed my cold frame's supply for the 7.5 V one (the workaround in E2), I got the leads into **J1** the wrong way round. Nothing smoked, but afterwards the regulator **U2** was a dead short from input to ground and the actuator no longer moved: the H-bridge **U3** had died as well. The Nano-style board survived.`,
        cause: `J1 goes straight to the regulator's input and C2, with nothing in between, so a reversed supply is limited only by the supply's own current limit, and every part on that path sees a negative voltage it has no rating for. Both poles of a screw terminal look the same, and a supply swap is exactly when this happens.`,
        workaround: `Put a Schottky diode in series with the positive lead, in the supply cable or on a terminal block. A 3 A part drops about 0.4 V at the board's current, which both a 12 V and a 7.5 V supply can spare. Mark the positive lead red, put a dot of paint beside the positive terminal, and check polarity with a meter before connecting any new supply.`,
        fix: `For a future revision: a P-channel MOSFET in the positive input, which costs almost no voltage, or at least a polarised connector instead of the screw terminal. That is for the maker to decide; I'm only reporting what happened to mine.`,
      },
      comments: [
        {
          author: 'ilse-marrow',
          daysAgo: 10.3,
          body: "Sorry about your board, Bram, and thank you for writing it up properly. I'm taking it as it is; a reverse-polarity MOSFET goes on the list for any next revision.",
        },
      ],
    },
    {
      kind: 'erratum_edit',
      erratumNumber: 2,
      author: 'bram-tolliver',
      daysAgo: 5.2,
      message: 'Add my thermocouple reading of the regulator tab to the cause',
      status: 'open',
      payload: {
        ...regulatorNow,
        cause: `${regulatorNow.cause}\n\nMeasured on a second Rev A board, with a thermocouple taped to the tab of U2: **118 °C** after one full stroke in a 24 °C shed, and the reset came during the third stroke.`,
      },
      comments: [
        {
          author: 'juniper-okoye',
          daysAgo: 4.1,
          body: "The Postmortem says the tab passed 110 °C on Ilse's bench. Both can be true, since the shed was warmer; worth saying where each figure comes from.",
        },
        {
          author: 'ilse-marrow',
          daysAgo: 2.9,
          body: "Your reading is in the Postmortem now. I'll take this once I've checked the wording against my bench figure, so the two numbers don't confuse anyone.",
        },
      ],
    },
    {
      kind: 'document_edit',
      sectionTitle: 'Hardware',
      author: 'bram-tolliver',
      daysAgo: 17.2,
      message: 'Power: point Rev A owners at the 7.5 V workaround',
      status: 'declined',
      decidedBy: 'ilse-marrow',
      decidedDaysAgo: 15.1,
      reason:
        'Thank you, Bram. This section describes the board as it is now, Rev B, and the Rev A advice already lives in E2 and the Rev A board notes; repeating it here means one more place to keep up to date.',
      payload: {
        title: hardwareNow.title,
        body: replaceParagraph(
          hardwareNow.body,
          'Rev B makes 5 V with',
          (paragraph) =>
            `${paragraph} If you still run a Rev A board, feed it from 7.5 V rather than 12 V until you can fit a buck module; see E2.`,
        ),
      },
      comments: [
        {
          author: 'bram-tolliver',
          daysAgo: 14.8,
          body: 'Fair enough, one place is better than two.',
        },
      ],
    },
    {
      kind: 'new_erratum',
      author: 'bram-tolliver',
      daysAgo: 128.3,
      message: 'The vent stayed open overnight after a power cut',
      status: 'withdrawn',
      decidedDaysAgo: 127.6,
      payload: {
        title: 'Vent stays open after a power cut',
        category: 'firmware',
        severity: 'minor',
        status: 'open',
        affected: ['Rev A'],
        fixedIn: null,
        refdes: ['M1'],
        parts: ['Micro linear actuator, 5 V'],
        pins: [],
        symptom: `We had a short power cut on a warm afternoon with the vent of my cold frame fully open. When the power came back the board restarted normally, but the vent never closed, although the evening went down to 9 °C. The log line said the vent was closed.`,
        cause: `I'm not sure. It looks as if the firmware doesn't know where the vent is after it restarts, and starts counting from closed whatever the actuator is really doing. I haven't looked at the code yet.`,
        workaround: '',
        fix: '',
      },
      comments: [
        {
          author: 'bram-tolliver',
          daysAgo: 127.6,
          body: "Withdrawing this: it's E4, which I hadn't seen. Sorry for the noise. The homing workaround there fixes it on mine.",
        },
      ],
    },
  ],
  followers: ['bram-tolliver'],
};
