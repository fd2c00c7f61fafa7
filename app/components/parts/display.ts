/**
 * How parts read on screen: capability names in words, part kinds, the filter the lists share.
 * Pure, so the pages and the tests agree on the wording.
 */
import type { PartSummary } from '@shared/contracts/checks';
import { pinLabels, type PartPin, type PinCapability, type PinCapabilityEntry } from '@shared/contracts/parts';
import type { PartKind } from '@shared/domain';

export const partKindLabels: Record<PartKind, string> = {
  microcontroller: 'Microcontroller',
  module: 'Module',
  logic_ic: 'Logic IC',
  logic_family: 'Logic family',
};

export const capabilityNames: Record<PinCapability, string> = {
  digital_in: 'Digital in',
  digital_out: 'Digital out',
  analog_in: 'Analog in',
  pwm: 'PWM',
  ext_interrupt: 'Ext. interrupt',
  pin_change_interrupt: 'Pin-change interrupt',
  i2c_sda: 'I²C SDA',
  i2c_scl: 'I²C SCL',
  spi_mosi: 'SPI MOSI',
  spi_miso: 'SPI MISO',
  spi_sck: 'SPI SCK',
  spi_ss: 'SPI SS',
  uart_tx: 'UART TX',
  uart_rx: 'UART RX',
  input_only: 'Input only',
  five_volt_tolerant: '5 V tolerant',
  strapping: 'Strapping',
  reserved_flash: 'Reserved for flash',
};

/** Capabilities that are a caution rather than a function. */
export const cautionCapabilities: readonly PinCapability[] = ['input_only', 'strapping', 'reserved_flash'];

/**
 * "Ext. interrupt (INT0)", "Strapping — boot mode select", "Digital out". The detail (the
 * datasheet's own name) goes in brackets, except for the plain digital functions where it adds
 * nothing; a caution's reason follows a dash.
 */
export function capabilityLabel(entry: PinCapabilityEntry): string {
  let label = capabilityNames[entry.function];
  if (entry.detail && entry.function !== 'digital_in' && entry.function !== 'digital_out') {
    label += ` (${entry.detail})`;
  }
  if (entry.reason) label += ` — ${entry.reason}`;
  return label;
}

/** Whether a pin answers to the query by any of its labels or by a capability's name or detail. */
export function pinMatches(pin: PartPin, query: string): boolean {
  const q = query.trim().toLowerCase();
  if (!q) return true;
  const words = [
    ...pinLabels(pin),
    ...pin.otherFunctions,
    ...pin.capabilities.flatMap((c) => [capabilityLabel(c), c.function.replace(/_/g, ' ')]),
  ];
  return words.some((w) => w.toLowerCase().includes(q));
}

/** Whether a part answers to the query by its name, slug or an alias. */
export function partMatches(part: Pick<PartSummary, 'name' | 'slug' | 'aliases'>, query: string): boolean {
  const q = query.trim().toLowerCase();
  if (!q) return true;
  return [part.name, part.slug, ...part.aliases].some((w) => w.toLowerCase().includes(q));
}

/** "4.5–5.5 V" or "3.3 V" for a supply window. */
export function windowText(window: { minVolts: number; maxVolts: number }): string {
  return window.minVolts === window.maxVolts ? `${window.minVolts} V` : `${window.minVolts}–${window.maxVolts} V`;
}

/** Bytes as a reader says them: "32 KiB", "2 KiB", "1 MiB", "512 bytes". */
export function bytesText(bytes: number): string {
  if (bytes >= 1024 * 1024 && bytes % (1024 * 1024) === 0) return `${bytes / (1024 * 1024)} MiB`;
  if (bytes >= 1024 && bytes % 1024 === 0) return `${bytes / 1024} KiB`;
  return `${bytes.toLocaleString('en')} bytes`;
}
