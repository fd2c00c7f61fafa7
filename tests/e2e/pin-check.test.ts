/**
 * The checks, end to end in Chromium. A maker adds a row with one mistake to a demo pin map (a
 * buzzer driven from A7, which on the ATmega328P is an analog input only), runs the pin check,
 * sees the finding with its datasheet source, turns it into an erratum in one step, and finds that
 * erratum on the part's page. Then the maker pastes a `size -A` report into the memory budget and
 * the chart and its table gain the build.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectNoProblems, startProduct, type Product } from '../setup/browser';

let product: Product;
beforeAll(async () => {
  product = await startProduct();
});
afterAll(async () => {
  await product?.close();
});

async function signInAs(page: Page, name: string, returnTo: string) {
  await page.goto(`/api/auth/github?returnTo=${encodeURIComponent(returnTo)}`);
  await page.getByRole('button', { name: new RegExp(`Continue as ${name}`) }).click();
}

describe('checks in the browser', () => {
  it('turns a pin check finding into an erratum that the part page lists', async () => {
    const { page, problems } = await product.newPage();
    await signInAs(page, 'Ilse Marrow', '/projects/greenhouse-vent-controller/pin-maps');
    const revB = page.getByTestId('pin-map').filter({ hasText: 'on Rev B' });
    await revB.waitFor();
    const rows = revB.getByTestId('pin-map-row');
    const before = await rows.count();

    // The mistake: a buzzer on A7. A new row asks for a digital output by default.
    await revB.getByTestId('add-row').click();
    const n = before + 1;
    await revB.getByLabel(`Pin, row ${n}`, { exact: true }).fill('A7');
    await revB.getByLabel(`Signal, row ${n}`, { exact: true }).fill('Alarm buzzer');
    await expect
      .poll(() => revB.getByLabel(`Required function, row ${n}`, { exact: true }).inputValue())
      .toBe('Digital out');
    await revB.getByTestId('check-pins').click();

    // Microchip ATmega328P datasheet (DS40002061), 1.1 Pin Descriptions: ADC7:6 (TQFP and VFQFN
    // packages) serve as analog inputs to the A/D converter only — no digital output.
    const finding = revB.getByTestId('pin-finding').filter({ hasText: 'A7' });
    await finding.waitFor();
    expect(await finding.textContent()).toMatch(/analog/i);
    expect(await finding.getByTestId('finding-source').textContent()).toMatch(/Microchip ATmega328/);
    // Rev B's own rows check clean: the new row is the only finding.
    expect(await revB.getByTestId('pin-finding').count()).toBe(1);

    // The maker keeps the row (saved as a new revision of the map) …
    await revB.getByTestId('save-pin-map').click();
    await revB.getByTestId('unsaved').waitFor({ state: 'detached' });
    await page.reload();
    await revB
      .getByTestId('pin-map-row')
      .nth(n - 1)
      .waitFor();
    expect(await revB.getByLabel(`Pin, row ${n}`, { exact: true }).inputValue()).toBe('A7');
    await revB.getByTestId('check-pins').click();

    // … and goes in one click to a filled-in erratum form, saved as it stands.
    await revB.getByTestId('pin-finding').filter({ hasText: 'A7' }).getByTestId('create-erratum').click();
    await expect.poll(() => page.url()).toMatch(/\/projects\/greenhouse-vent-controller\/errata\/new$/);
    const title = await page.getByLabel('Title', { exact: true }).inputValue();
    expect(title).toMatch(/Alarm buzzer/);
    expect(title).toMatch(/A7/);
    await page.getByTestId('save').click();
    await expect.poll(() => page.url()).toMatch(/\/projects\/greenhouse-vent-controller\/errata\/E\d+$/);
    await page.getByRole('heading', { name: /Alarm buzzer/ }).waitFor();

    // The part page lists it among the errata that mention the part or its pins.
    await page.goto('/parts/atmega328p');
    const mentions = page.locator('section[aria-labelledby="part-mentions"]');
    await mentions.getByRole('link', { name: /Alarm buzzer/ }).waitFor();
    await mentions.getByRole('link', { name: /Alarm buzzer/ }).click();
    await expect.poll(() => page.url()).toMatch(/\/projects\/greenhouse-vent-controller\/errata\/E\d+$/);
    expectNoProblems(problems);
  });

  it('adds a build from a pasted size -A report, and the chart and table show it', async () => {
    const { page, problems } = await product.newPage();
    await signInAs(page, 'Ilse Marrow', '/projects/greenhouse-vent-controller/memory');
    const table = page.getByTestId('memory-table');
    await table.waitFor();
    const rows = table.getByTestId('memory-row');
    const before = await rows.count();
    const caption = page.getByTestId('memory-chart').locator('figcaption');
    expect(await caption.textContent()).toContain(`across ${before} builds`);
    // A real browser draws the chart.
    await page.getByTestId('memory-chart').locator('canvas').waitFor();

    await page.getByTestId('build-add').click();
    await page.getByLabel('Build', { exact: true }).fill('v0.13 smaller menu');
    await page
      .getByLabel('What this build changed (for the ledger)')
      .fill('Dropped the help texts from the serial menu.');
    // The layout `avr-size -A` prints: section, size, address, then the total.
    const report = [
      'vent-controller.ino.elf  :',
      'section                     size      addr',
      '.data                        250   8388864',
      '.text                      24000         0',
      '.bss                        1190   8389114',
      '.comment                      17         0',
      '.note.gnu.avr.deviceinfo      64         0',
      'Total                      25521',
      '',
    ].join('\n');
    await page.getByTestId('report-text').locator('textarea').fill(report);
    await expect.poll(() => page.getByTestId('report-detected').textContent()).toMatch(/size -A/);
    await page.getByTestId('build-submit').click();

    await expect.poll(() => rows.count()).toBe(before + 1);
    const added = rows.filter({ hasText: 'v0.13 smaller menu' });
    // avr-libc's rule for AVR (the avr-size "Program" and "Data" figures): flash = .text + .data
    // = 24,000 + 250 = 24,250 B; static RAM = .data + .bss = 250 + 1,190 = 1,440 B.
    expect(await added.textContent()).toContain('24,250 B');
    expect(await added.textContent()).toContain('1,440 B');
    expect(await caption.textContent()).toContain(`across ${before + 1} builds`);
    expectNoProblems(problems);
  });
});
