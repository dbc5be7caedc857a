// Golden runs in the browser: the first draws of every example at a fixed seed, stored once in
// tests/golden/draws.json (written natively by tests/cli/golden.rs), must come out of the page's
// WebAssembly engine bit for bit. Each stored link is opened in the page and rerun; the page's CSV
// of draws must equal the stored text (every value is in Rust's shortest round-trip form, so equal
// text is equal bits).
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { BASE_URL, downloadText, openChecked } from './harness.mjs';

const golden = JSON.parse(readFileSync(new URL('../golden/draws.json', import.meta.url), 'utf8'));

test('the golden draws of every example come out of the page bit for bit', { timeout: 600_000 }, async () => {
  const session = await openChecked();
  try {
    const names = Object.keys(golden.runs);
    assert.ok(names.length >= 3, 'golden runs exist');
    for (const name of names) {
      const { link, csv } = golden.runs[name];
      const fragment = link.slice(link.indexOf('#'));
      const page = await session.newPage();
      await page.goto(`${BASE_URL}${fragment}`);
      await session.waitFor('the golden link to open', () => {
        const banner = document.getElementById('link-banner');
        return !banner.hidden && banner.dataset.kind === 'ok';
      }, null, 15_000, page);
      const before = Number(await page.$eval('#results', (el) => el.dataset.shown ?? 0));
      await page.click('#link-banner button.primary');
      await session.waitFor('the golden run', (n) => Number(document.getElementById('results').dataset.shown ?? 0) > n
        && !document.getElementById('start').disabled, before, 120_000, page);
      assert.equal(await downloadText(page, '#export-csv'), csv, `${name}: the page's draws differ from the golden draws`);
      await page.close();
    }
  } finally {
    await session.close();
  }
});
