/**
 * An invented project for the errata tests: a greenhouse sensor node with three board
 * revisions and six errata. Each test states what it expects from these records by hand.
 */
import type { Erratum } from '@shared/contracts/errata';

export const revA = { id: 11, label: 'Rev A' };
export const revB = { id: 12, label: 'Rev B' };
export const revC = { id: 13, label: 'Rev C' };
export const boards = [revA, revB, revC];

const categories = {
  pin: { slug: 'pin-capability', name: 'Pin capability' },
  power: { slug: 'power', name: 'Power' },
  docs: { slug: 'documentation', name: 'Documentation' },
  layout: { slug: 'footprint-layout', name: 'Footprint / layout' },
  firmware: { slug: 'firmware', name: 'Firmware' },
};

export function erratum(number: number, over: Partial<Erratum> = {}): Erratum {
  return {
    id: 100 + number,
    number,
    code: `E${number}`,
    title: `Erratum ${number}`,
    category: categories.docs,
    severity: 'minor',
    status: 'open',
    affected: [revA],
    fixedIn: null,
    refdes: [],
    parts: [],
    pins: [],
    symptom: '',
    cause: '',
    workaround: '',
    fix: '',
    html: { symptom: '', cause: '', workaround: '', fix: '' },
    reportedBy: null,
    reportedByText: '',
    tags: [],
    revision: 1,
    commentCount: 0,
    createdAt: '2026-02-01T09:00:00.000Z',
    updatedAt: `2026-02-0${number}T09:00:00.000Z`,
    ...over,
  };
}

export const errata: Erratum[] = [
  erratum(1, {
    title: 'Relay never switches',
    category: categories.pin,
    severity: 'major',
    status: 'workaround',
    affected: [revA],
    fixedIn: revB,
    refdes: ['K1', 'Q2'],
    parts: ['XM-32 module'],
    pins: ['GPIO35'],
    symptom: 'The relay LED lights but the contacts never close.',
    cause: 'GPIO35 is input-only.',
    workaround: 'Cut the trace and bodge Q2 to GPIO25.',
  }),
  erratum(2, {
    title: 'Regulator overheats above 400 mA',
    category: categories.power,
    severity: 'critical',
    status: 'open',
    affected: [revB, revA],
    refdes: ['U3'],
    parts: ['LR-1117'],
    symptom: 'The board shuts down after a minute with the pump running.',
  }),
  erratum(3, {
    title: 'Silkscreen labels of J2 swapped',
    category: categories.docs,
    severity: 'cosmetic',
    status: 'wont_fix',
    affected: [revA],
  }),
  erratum(4, {
    title: 'USB connector footprint mirrored',
    category: categories.layout,
    severity: 'critical',
    status: 'fixed_later',
    affected: [revA],
    fixedIn: revB,
    refdes: ['J1'],
    workaround: 'Mount the connector on the back side.',
  }),
  erratum(5, {
    title: 'Brown-out resets when the motor starts',
    category: categories.power,
    severity: 'major',
    status: 'workaround',
    affected: [revB],
    fixedIn: revC,
    workaround: 'Add 470 µF across the motor rail.',
  }),
  erratum(6, {
    title: 'Watchdog window too short during flash writes',
    category: categories.firmware,
    severity: 'minor',
    status: 'open',
    affected: [revB, revC],
  }),
];

export const codes = (items: readonly Erratum[]) => items.map((e) => e.code);
