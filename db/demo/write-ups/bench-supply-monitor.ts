/**
 * Demo write-up: a voltage and current monitor for a linear bench supply, on an RP2040 board.
 * Everything here is invented. Bodies are built from shared blocks, so each revision differs
 * from the one before only where the author really changed something.
 */
import type { DemoProject } from '../types';

const repo = 'https://git.example.org/ilse-marrow/bench-supply-monitor';

// --- Overview --------------------------------------------------------------------------------

const overviewWhat = `## What it is

A small box that sits on top of my linear bench supply (0–20 V, up to 5 A) and tells me what the supply is really delivering: the voltage after the shunt, the current through it, and the energy used since I last pressed reset. It logs a line over USB ten times a second for a laptop to plot, and it opens a relay in the output lead when the current passes a limit I set. That last part is for unattended soak tests, where the supply's own current limit would happily hold a shorted board at 5 A all night.

It is built around an **RP2040 board** with the common 40-pin development-board footprint, so the pins are named by their GP numbers (GP4, GP14 and so on). An INA219-class monitor does the measuring over I²C, and a 128 × 64 OLED shows the numbers. Sources are in the [repository](${repo}).`;

const overviewCaution = `> **High current.** A supply like this can push 5 A into a short. Wiring, terminals, the relay contacts and the board's copper must all be rated for that current, and a fault can burn a board or a finger. The monitor is a second line of defence, *not* a replacement for the supply's own current limit or a fuse: keep the current limit set for what the device under test needs, and never connect a battery pack to the output. The supply itself is mains powered and this project never opens it. Follow your local codes and workplace practice.`;

const overviewHow = `## How it works, in one paragraph

Current flows from the supply's positive terminal through the relay contacts and a 10 mΩ four-terminal shunt to the output. The sensor measures the voltage across the shunt (1 mA per count) and the output voltage after it (4 mV per count). One core of the RP2040 reads the sensor a thousand times a second and trips the relay; the other drives the display and the USB log. Hardware, Firmware and Calibration have the details.`;

const overviewStatusEarly = `## Status

- [x] Rev A board built
- [x] Calibrated against my bench meter
- [ ] Soak test of the over-current trip
- [ ] Lid with a window for the display`;

const overviewStatusNow = `## Status

- [x] Rev A board built
- [x] Calibrated against my bench meter
- [x] Soak test of the over-current trip: 120 trips at 5 A, see the build log
- [ ] Lid with a window for the display
- [ ] A comparator that trips the relay without the firmware, see the Postmortem`;

// --- Hardware --------------------------------------------------------------------------------

const hardwarePath = `## Signal path

Supply positive → relay contacts (normally open) → shunt → output positive. The negative lead passes straight through, and the monitor's ground is tied to it, because the sensor measures the bus voltage against its own ground. The shunt is on the **high side** on purpose: the prototype had it in the negative lead, and the Postmortem explains why that went wrong.`;

const hardwarePins = `## Pins

| Function | RP2040 pin | Notes |
|---|---|---|
| Sensor SDA (I²C0) | GP4 | 4.7 kΩ pull-up to 3.3 V, 400 kHz |
| Sensor SCL (I²C0) | GP5 | 4.7 kΩ pull-up to 3.3 V |
| Display SDA (I²C1) | GP6 | its own bus, so a frame update never delays a sample |
| Display SCL (I²C1) | GP7 | |
| "Output on" input | GP14 | the supply's 5 V signal through a divider |
| Trip reset button | GP13 | to ground, internal pull-up |
| Relay module IN | GP15 | active high |`;

const hardwareLevel = `## The "output on" input

The supply's rear accessory socket brings out the 5 V signal that lights its "output on" lamp. The RP2040 is **not 5 V tolerant**: its I/O runs from IOVDD at 3.3 V, and no pin may go more than 0.5 V above IOVDD. A 22 kΩ / 33 kΩ divider brings 5.0 V down to 3.0 V (5.5 V to 3.3 V), comfortably above the 2.0 V the pin needs to read high. The signal changes a few times an hour, so the divider's 13 kΩ source impedance doesn't matter.`;

const hardwareRelay = (rating: string) => `## Relay

An SRD-05VDC relay module with an NPN transistor input (active high) switches the output. Its contacts are rated 10 A at ${rating} DC, enough for 20 V and 5 A into a resistive load; inductive loads such as motors need a diode across the load. The coil runs from the USB 5 V, so with no USB power the relay drops out and the output is off, on purpose. If your module has an optocoupler input that is pulled up to 5 V and switched low, check that it turns fully off from a 3.3 V pin before you trust it.`;

const hardwareCopper = `## Copper for 5 A

The 5 A path is short, 4 mm wide on both layers of 1 oz copper and stitched with vias. By the usual trace-width charts that is good for well over 5 A at a 10 °C rise; at 5 A on the bench it warmed by about 8 °C. The wires to the binding posts are 1.5 mm².`;

const hardwareKelvin = `## Kelvin connections on the shunt

The shunt has four terminals: two wide ones for the current and two small ones for sensing. The sense traces leave the small pads as a pair, run away from the current path, and reach the sensor through 10 Ω resistors with 100 nF across the inputs, as the sensor's datasheet suggests for filtering. At 10 mΩ, a single millimetre of 4 mm wide copper in the sense path, about 0.12 mΩ, would already add more than 1 %. That is exactly what the prototype got wrong.`;

// --- Firmware --------------------------------------------------------------------------------

const firmwareSplit = `## Two cores, two jobs

The firmware is plain C on the vendor's SDK. **Core 0** does nothing but measure and protect: it reads the sensor at 1 kHz, compares the current with the trip limit and drops the relay. **Core 1** does everything slow: the display, the USB log, the energy total and the serial commands. They share one small struct guarded by a spin lock; core 0 writes it, core 1 reads it.`;

const firmwareSetup = `## Sensor set-up

\`\`\`c
#define INA_ADDR    0x40
#define REG_CONFIG  0x00
#define REG_SHUNT   0x01
#define REG_BUS     0x02
#define REG_CALIB   0x05

/* 32 V bus range setting (the pin itself is rated to 26 V), PGA /2 for a ±80 mV
 * shunt range, 12-bit shunt and bus conversions, continuous. */
#define INA_CONFIG  0x299F
/* Cal = trunc(0.04096 / (Current_LSB * R_shunt)) with 200 uA and 10 mOhm */
#define INA_CALIB   20480
\`\`\`

At 10 mΩ, 5 A is 50 mV across the shunt, inside the ±80 mV range with room to watch a fault go past the limit. In continuous mode the sensor converts shunt and bus in turn, 532 µs each, so each register refreshes about every 1.06 ms; reading faster than 1 kHz would only read the same value twice.`;

const firmwareTrip = `## The trip

\`\`\`c
static void sampler(void) {
  absolute_time_t next = get_absolute_time();
  uint8_t over = 0;
  for (;;) {
    next = delayed_by_us(next, 1000);
    int16_t shunt = (int16_t)ina_read(REG_SHUNT);  /* 10 uV per count: 1 mA through 10 mOhm */
    if (shunt > settings.trip_ma) {
      if (over < settings.trip_samples) over++;
      if (over == settings.trip_samples) relay_open();
    } else {
      over = 0;
    }
    publish(shunt, ina_read(REG_BUS));
    sleep_until(next);
  }
}
\`\`\`

Three samples over the limit in a row trip the relay, so a capacitor charging at switch-on doesn't. With the relay's release time the output is off within about 10 ms, and it stays off until the button on GP13 is pressed.`;

const firmwareWhyShunt = `The trip compares the raw shunt voltage rather than the current register, on purpose. The current register only means something once the calibration register has been written, and it reads zero after the sensor has lost its settings in a power glitch. The shunt register needs no set-up at all, and with a 10 mΩ shunt it already counts milliamps.`;

const firmwareLog = `## USB log

Core 1 averages the samples into one CSV line every 100 ms:

\`\`\`text
ms,mv,ma,mwh
125300,12004,1482,619
125400,12004,1479,619
\`\`\`

Commands on the same serial port set the limit (\`trip 2500\`), the averaging and the log rate; \`rearm\` does what the button does, and \`cal\` prints the calibration.`;

// --- Calibration -----------------------------------------------------------------------------

const calibrationMethod = `## Method

1. Warm the monitor up for 15 minutes with 1 A flowing, so the shunt is at a steady temperature.
2. Put an electronic load on the output and my 4½-digit bench meter in series, on its 10 A range. The meter is specified to 0.2 % + 3 digits there, so nothing below is better than that.
3. Step the load through 0.1, 1, 3 and 5 A, and note the meter and the monitor's averaged reading at each step.
4. Fit a gain and an offset, store them, and step through again.`;

const calibrationTableRaw = `## Results

| Meter | Prototype, two-terminal shunt | Rev A, Kelvin sense |
|---|---|---|
| 0.100 A | 0.119 A | 0.100 A |
| 1.000 A | 1.190 A | 1.004 A |
| 3.000 A | 3.570 A | 3.012 A |
| 5.000 A | 5.950 A | 5.019 A |`;

const calibrationTableTrimmed = `## Results

| Meter | Prototype, two-terminal shunt | Rev A, Kelvin sense | Rev A after trim |
|---|---|---|---|
| 0.100 A | 0.119 A | 0.100 A | 0.100 A |
| 1.000 A | 1.190 A | 1.004 A | 1.000 A |
| 3.000 A | 3.570 A | 3.012 A | 3.001 A |
| 5.000 A | 5.950 A | 5.019 A | 5.000 A |`;

const calibrationDiscussion = `The prototype read 19 % high at every current: its sense wires were soldered to the shunt's current pads, so about 1.9 mΩ of joint and copper sat in series with the 10 mΩ it thought it was measuring. Rev A, sensing at the shunt's own sense terminals, is within 0.4 %, the shunt's 1 % tolerance doing better than promised.`;

const calibrationTrim = `A current gain of 0.9962 brings Rev A within a count of the meter. Voltage, checked the same way at 1, 5, 12 and 20 V, needed a gain of 1.0011 and a 4 mV offset.`;

const calibrationConstants = `## Stored constants

The constants live in the last sector of flash, and \`cal\` prints them:

\`\`\`ini
[calibration]
shunt_milliohm = 10.00
current_gain = 0.9962
current_offset_ma = 0
voltage_gain = 1.0011
voltage_offset_mv = -4
\`\`\`

The trip compares raw shunt counts with the limit, so calibration can't make it late: uncalibrated, a count is at most the shunt's tolerance away from the truth.`;

// --- Postmortem ------------------------------------------------------------------------------

const postmortemFiveVolt = `## A 5 V signal on a 3.3 V pin

The first prototype took the supply's 5 V "output on" signal straight into GP14. It seemed to work: the pin read high when the output was on. A week later, with USB unplugged, I noticed the board's power LED glowing faintly. The signal was pushing current through GP14's protection diode into the 3.3 V rail and back-powering the whole board, and soon after that GP14 read high whatever the signal did.

The RP2040 is not 5 V tolerant: no pin may go more than 0.5 V above IOVDD. Rev A has a 22 kΩ / 33 kΩ divider, and the damaged board went in the bin.`;

const postmortemGroundLoop = `## The ground loop through USB

The prototype measured current in the negative lead, between the output terminal and the monitor's ground. That is fine until something else connects the grounds. My devices under test are mostly boards with their own USB connection to the laptop that also logs the monitor, so part of the return current went back through the board's USB cable, the laptop and the monitor's USB cable, and never passed the shunt. The reading was 20 to 30 % low, and it changed when I moved a cable.

Rev A measures on the high side, where every milliamp the device draws has to pass the shunt whatever the ground does. For logging from a device that shares the laptop's ground I now also use a USB isolator.`;

const postmortemKelvin = `## Sensing at the wrong place

The prototype's shunt was a two-terminal 10 mΩ resistor, and I soldered the sense wires onto the same pads as the heavy current wires. About 1.9 mΩ of solder joint and copper sat inside the measurement, and the monitor read 19 % high. With the ground loop pulling the other way, it took me an embarrassing week to see either. Rev A uses a four-terminal shunt with Kelvin sense traces.`;

const postmortemLimit = `## A limit to respect

The INA219-class sensor's bus input is rated to 26 V. My supply stops at 20 V, but plenty of bench supplies go to 30 V, and this design is not for them without a different sensor.`;

const postmortemLessons = (heading: string) => `## ${heading}

- Anything from a 5 V world that touches an RP2040 pin goes through a divider or a level shifter, even a "signal" that is only an LED line.
- Measure current on the high side whenever something else may share the ground, and USB always does.
- A shunt of a few milliohms needs four terminals and sense traces that carry no current.
- A trip that depends on firmware is only as good as the firmware. The INA219 class has no alert output; next time I would pick a monitor with one, or add a comparator on the shunt, so the relay drops even if the code hangs.`;

// --- Build log -------------------------------------------------------------------------------

const prototypeLog = `First light on the perfboard: an RP2040 board, an INA219-class breakout, a 10 mΩ two-terminal shunt in the negative lead and a small OLED. With the supply at 12 V into a 10 Ω power resistor, my bench meter says 1.20 A and the monitor says 1.43 A. That is 19 % high, and consistently so, which is at least a clue.

- [x] Sensor and display both answer on I²C
- [x] Voltage within 10 mV of the meter
- [ ] Find out why the current is 19 % high`;

const prototypeLogUpdate = `**Update.** The sense wires share the solder joints with the current wires. Moving them to the very ends of the resistor body cut the error to 6 %, which proves the point. Rev A gets a proper four-terminal shunt.`;

const tripLog = `Soak test of the over-current trip: an electronic load stepping from 1 A to 5 A every 30 seconds, the trip set at 4 A, and \`rearm\` sent over serial after each trip. 120 trips overnight, 120 relay openings, no missed trip and no false one at 1 A. The relay module stayed cool all night, and the shunt settled about 10 °C above the room.`;

const tripLogTiming = `Timing from the scope, with a current probe on the output lead: the current crosses 4 A, the firmware sees its third sample over the limit 2–3 ms later, and the contacts are open 6–8 ms after that. The worst of the 120 was 10.8 ms from crossing the limit to zero current. The contacts look clean under a loupe; 20 V at 5 A is well inside their DC rating, but I will look again after a thousand trips.`;

export const benchSupplyMonitor: DemoProject = {
  slug: 'bench-supply-monitor',
  owner: 'ilse-marrow',
  editors: [],
  status: 'published',
  meta: [
    {
      author: 'ilse-marrow',
      daysAgo: 150,
      message: 'Create the project',
      title: 'Bench supply monitor',
      summary: 'Voltage and current logger for my bench supply.',
      licence: 'unspecified',
      repoUrl: '',
      hazards: [],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 104,
      message: 'MIT licence, repository link and the high-current mark',
      title: 'Bench supply monitor',
      summary:
        'An RP2040 add-on that logs voltage and current of a linear bench supply and trips a relay on over-current.',
      licence: 'MIT',
      repoUrl: repo,
      hazards: ['high_current'],
    },
    {
      author: 'ilse-marrow',
      daysAgo: 11,
      message: 'Summary: say what it measures with and how fast it trips',
      title: 'Bench supply monitor',
      summary:
        'An RP2040 add-on for a 0–20 V, 5 A linear bench supply: measures voltage and current with an INA219-class sensor, shows them on a small display, logs over USB and opens a relay within about 10 ms on over-current.',
      licence: 'MIT',
      repoUrl: repo,
      hazards: ['high_current'],
    },
  ],
  boards: [
    {
      label: 'Rev A',
      releasedOn: '2026-08-20',
      notes: `Hand-assembled prototype board, three made. High-side 10 mΩ four-terminal shunt with Kelvin sense traces; sensor and display on separate I²C buses; 22 kΩ / 33 kΩ divider on the 5 V "output on" input (GP14).

**Limits.** The INA219-class sensor's bus input is rated to 26 V, so this board is for supplies up to 20 V. The output path is rated for 5 A.`,
    },
  ],
  sections: [
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 100,
          message: 'First version of the overview',
          title: 'Overview',
          body: [overviewWhat, overviewCaution, overviewHow].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 40,
          message: 'Add a status list',
          title: 'Overview',
          body: [overviewWhat, overviewCaution, overviewHow, overviewStatusEarly].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 4,
          message: 'Soak test done; note the comparator idea',
          title: 'Overview',
          body: [overviewWhat, overviewCaution, overviewHow, overviewStatusNow].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 98,
          message: 'Describe the Rev A board',
          title: 'Hardware',
          body: [hardwarePath, hardwarePins, hardwareLevel, hardwareRelay('28 V'), hardwareKelvin].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 60,
          message: 'Add copper width and temperature rise for the 5 A path',
          title: 'Hardware',
          body: [hardwarePath, hardwarePins, hardwareLevel, hardwareRelay('28 V'), hardwareCopper, hardwareKelvin].join(
            '\n\n',
          ),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 18,
          message: 'Relay contacts: 10 A at 30 V DC, not 28 V',
          title: 'Hardware',
          body: [hardwarePath, hardwarePins, hardwareLevel, hardwareRelay('30 V'), hardwareCopper, hardwareKelvin].join(
            '\n\n',
          ),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 95,
          message: 'Describe the firmware',
          title: 'Firmware',
          body: [firmwareSplit, firmwareSetup, firmwareTrip, firmwareLog].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 27,
          message: 'Explain why the trip reads the shunt register',
          title: 'Firmware',
          body: [firmwareSplit, firmwareSetup, firmwareTrip, firmwareWhyShunt, firmwareLog].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 35,
          message: 'Calibration results',
          title: 'Calibration',
          body: [calibrationMethod, calibrationTableRaw, calibrationDiscussion].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 10,
          message: 'Add the trimmed column and the stored constants',
          title: 'Calibration',
          body: [
            calibrationMethod,
            calibrationTableTrimmed,
            calibrationDiscussion,
            calibrationTrim,
            calibrationConstants,
          ].join('\n\n'),
        },
      ],
    },
    {
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 80,
          message: 'Postmortem of the prototype and Rev A',
          title: 'Postmortem',
          body: [postmortemFiveVolt, postmortemGroundLoop, postmortemKelvin, postmortemLessons('Lessons')].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 22,
          message: "Add the sensor's 26 V limit",
          title: 'Postmortem',
          body: [
            postmortemFiveVolt,
            postmortemGroundLoop,
            postmortemKelvin,
            postmortemLimit,
            postmortemLessons('Lessons'),
          ].join('\n\n'),
        },
        {
          author: 'ilse-marrow',
          daysAgo: 2,
          message: 'Retitle the lessons heading',
          title: 'Postmortem',
          body: [
            postmortemFiveVolt,
            postmortemGroundLoop,
            postmortemKelvin,
            postmortemLimit,
            postmortemLessons('What I would do differently'),
          ].join('\n\n'),
        },
      ],
    },
  ],
  logEntries: [
    {
      loggedOn: '2026-07-05',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 148.6,
          message: 'Prototype on perfboard',
          title: 'Perfboard prototype reads volts and amps',
          body: prototypeLog,
        },
        {
          author: 'ilse-marrow',
          daysAgo: 146.3,
          message: 'Found where the 19 % comes from',
          title: 'Perfboard prototype reads volts and amps',
          body: [prototypeLog, prototypeLogUpdate].join('\n\n'),
        },
      ],
    },
    {
      loggedOn: '2026-07-19',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 134.6,
          message: 'A dead pin',
          title: '5 V into a 3.3 V pin: one dead GP14',
          body: `The "output on" signal from the supply's rear socket is 5 V, and I had wired it straight to GP14. The RP2040 is not 5 V tolerant, and I knew that. Tonight, with USB unplugged, the board's power LED was glowing: the signal was feeding the 3.3 V rail through the pin's protection diode. By the time I had the meter out, GP14 read high whatever the signal did.

New board, and a 22 kΩ / 33 kΩ divider: 5 V becomes 3.0 V, which reads high with a volt to spare and stays well inside the limit. The dead board is labelled and in the drawer of shame.`,
        },
      ],
    },
    {
      loggedOn: '2026-08-02',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 120.6,
          message: 'Ground loop found',
          title: 'Current reads low when the device under test is on USB',
          body: `Testing a small board that is itself plugged into the laptop, the monitor read 0.31 A where the meter said 0.42 A, and the number moved when I touched the USB cables. Unplugging the board's own USB cable brought the reading back to 0.42 A.

The shunt is in the negative lead, and the laptop joins the board's ground and the monitor's ground through two USB cables. About a quarter of the return current took that path and never passed the shunt. Rev A will put the shunt on the high side, where there is no way around it.`,
        },
      ],
    },
    {
      loggedOn: '2026-08-20',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 102.6,
          message: 'Rev A released',
          title: 'Rev A: high-side shunt, Kelvin sense, two I²C buses',
          body: `Rev A is released. What changed from the prototype:

1. The shunt is on the high side, so a shared ground can no longer steal current from the measurement.
2. A four-terminal 10 mΩ, 3 W shunt with Kelvin sense traces and the 10 Ω / 100 nF input filter.
3. A 22 kΩ / 33 kΩ divider on GP14 for the 5 V "output on" signal.
4. The display on its own I²C bus (GP6 and GP7), so a full frame, about 25 ms at 400 kHz, never delays a sample.

Three boards made: one for the bench, two spares.`,
        },
      ],
    },
    {
      loggedOn: '2026-09-27',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 64.6,
          message: 'Calibration evening',
          title: 'Calibrated against the bench meter',
          body: `Calibration evening. With the raw shunt value, Rev A reads 0.4 % high across the range, against 19 % on the prototype: the Kelvin pads did their job. A gain of 0.9962 brings it within a count of the meter at 1, 3 and 5 A. Voltage needed 0.11 % and a 4 mV offset.

The shunt warms by about 10 °C at 5 A. At the resistor's 50 ppm/°C that is 0.05 %, small next to the meter's own 0.2 %, so I calibrated warm, at 1 A after 15 minutes, and accept a little error at the extremes.`,
        },
      ],
    },
    {
      loggedOn: '2026-11-08',
      revisions: [
        {
          author: 'ilse-marrow',
          daysAgo: 22.6,
          message: 'Soak test',
          title: 'Trip soak test: 120 trips at 5 A',
          body: tripLog,
        },
        {
          author: 'ilse-marrow',
          daysAgo: 21.9,
          message: 'Add the timing figures',
          title: 'Trip soak test: 120 trips at 5 A',
          body: [tripLog, tripLogTiming].join('\n\n'),
        },
      ],
    },
  ],
};
