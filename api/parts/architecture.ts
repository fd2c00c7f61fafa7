/**
 * Which memory rule a part's builds use (shared/checks/size-report.ts `memoryUse`). Known slugs
 * first; otherwise a rule by name for families whose toolchains share the section layout; anything
 * else is `generic` (sections classified by name, stated as an assumption in the result).
 */
import type { Architecture } from '../../shared/checks/size-report';

const BY_SLUG: Record<string, Architecture> = {
  atmega328p: 'avr',
  rp2040: 'arm',
  esp32: 'xtensa',
};

const BY_NAME: [RegExp, Architecture][] = [
  // avr-gcc targets: the avr-libc rule applies.
  [/^(atmega|attiny|atxmega|avr)/i, 'avr'],
  // Cortex-M parts built with arm-none-eabi-gcc.
  [/^(rp2040|rp2350|stm32|samd|nrf5)/i, 'arm'],
  // The original ESP32 and the S2/S3 are Xtensa; the C and H series are RISC-V (generic here).
  [/^esp32(?!-?[ch]\d)/i, 'xtensa'],
];

export function architectureOf(part: { slug: string; name: string }): Architecture {
  const known = BY_SLUG[part.slug];
  if (known) return known;
  for (const [pattern, architecture] of BY_NAME) {
    if (pattern.test(part.slug) || pattern.test(part.name)) return architecture;
  }
  return 'generic';
}
