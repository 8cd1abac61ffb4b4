/**
 * Choosing a series through the series picker (src/features/catalogue/SeriesPicker.tsx) as a
 * person does: typing part of a code into the combobox, then either the keyboard (arrow keys to
 * the series, Enter) or a click on the option.
 */
import type { Locator } from 'playwright-core';

const WAIT = 15_000;

/** Waits until `check` holds, polling; fails naming `what`. */
async function until(what: string, check: () => Promise<boolean>) {
  const end = Date.now() + WAIT;
  while (!(await check())) {
    if (Date.now() > end) throw new Error(`series picker: ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * Types `typed` into the picker `box` (a combobox) and chooses the series whose code is `code`:
 * by keyboard (ArrowDown until it is the active option, then Enter) or by a click. Checks the list
 * closed and the box then shows the series (or, for a picker that adds to a list, `adds`, is empty
 * again for the next one).
 */
export async function pickSeries(box: Locator, typed: string, code: string, how: 'keyboard' | 'click' = 'keyboard', adds = false) {
  const page = box.page();
  if ((await box.getAttribute('role')) !== 'combobox') throw new Error('series picker: the box is not a combobox');
  await box.click();
  await box.fill(typed);
  const listbox = page.locator(`#${await box.getAttribute('aria-controls')}`);
  const option = listbox.getByRole('option').filter({ hasText: new RegExp(`^${code} `) });
  // The list answers the text typed (not an earlier one) and holds the series.
  await until(`the list for "${typed}" never held ${code}`, async () => (await listbox.getAttribute('aria-busy')) === 'false' && (await option.count()) === 1);
  if (how === 'click') {
    await option.click();
  } else {
    const target = await option.getAttribute('id');
    for (let i = 0; i < 25 && (await box.getAttribute('aria-activedescendant')) !== target; i++) await box.press('ArrowDown');
    if ((await box.getAttribute('aria-activedescendant')) !== target) throw new Error(`series picker: the arrow keys never reached ${code}`);
    await box.press('Enter');
  }
  const shown = async () => (adds ? (await box.inputValue()) === '' : (await box.inputValue()).startsWith(`${code} — `));
  await until(`the box does not show ${adds ? 'nothing' : code} after choosing ${code}`, async () => (await shown()) && (await box.getAttribute('aria-expanded')) === 'false');
}
