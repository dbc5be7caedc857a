// Share links in the page: a copied link reopens, in another tab, the same model and settings, and
// its rerun gives the same report to the byte; the user's own text stays recoverable. Damaged,
// cut-short and oversized links show a clear error and load nothing; model text with HTML in it is
// shown as text; a model too large for a link is refused with the engine's message.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import {
  BASE_URL, downloadText, editorText, fillRunForm, mixwell, openChecked, replaceEditorText, runAndWait,
} from './harness.mjs';

const bannerOf = (page) => page.$eval('#link-banner', (el) => ({ hidden: el.hidden, kind: el.dataset.kind, text: el.textContent }));

/** The form's values that a link carries. */
const formOf = (page) => page.evaluate(() => {
  const form = document.getElementById('run-form');
  const value = (name) => form.elements[name].value;
  return {
    kernel: form.querySelector('input[name="kernel"]:checked').value, tuning: value('tuning'),
    chains: value('chains'), draws: value('draws'), warmup: value('warmup'), seed: value('seed'),
    trials: value('trials'), window: value('window'), score: value('score'), freeze: value('freeze'), pilot: value('pilot'),
  };
});

test('a copied link reopens the run in a new tab, and its rerun gives the same report', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page, context } = session;
    await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: new URL(BASE_URL).origin });
    await page.click('button[data-example="cycling_club"]');
    const settings = { kernel: 'slice', tuning: 'bo', chains: 2, draws: 300, warmup: 150, trials: 9, window: 40, seed: 424242, score: 'ess-per-eval', freeze: 'best', pilot: 120 };
    await fillRunForm(page, settings);
    await runAndWait(session);
    const original = await downloadText(page, '#export-json');
    const source = await editorText(page);
    const shown = await page.inputValue('#share-link');
    // The length is said before the link is copied.
    const said = (await page.textContent('#share-status')).match(/A link of ([\d,]+) characters/);
    assert.ok(said, 'the link\'s length is shown before copying');
    assert.equal(Number(said[1].replace(/,/g, '')), shown.length);
    await page.click('#copy-link');
    await session.waitFor('the copy to be confirmed', () => /^Copied a link of/.test(document.getElementById('share-status').textContent));
    const copied = await page.evaluate(() => navigator.clipboard.readText());
    assert.equal(copied, shown);
    assert.ok(copied.startsWith(BASE_URL), 'the link opens this page');

    const other = await session.newPage();
    await other.goto(copied);
    await session.waitFor('the shared run to open', () => {
      const banner = document.getElementById('link-banner');
      return !banner.hidden && banner.dataset.kind === 'ok';
    }, null, 15_000, other);
    assert.equal(await editorText(other), source, 'the model is restored');
    assert.deepEqual(await formOf(other), await formOf(page), 'the settings are restored');
    assert.equal(await other.evaluate(() => location.hash), '', 'the link is consumed, so a reload keeps later edits');
    await session.screenshot('link-opened', { on: other });
    const before = Number(await other.$eval('#results', (el) => el.dataset.shown ?? 0));
    await other.click('#link-banner button.primary');
    await session.waitFor('the rerun', (n) => Number(document.getElementById('results').dataset.shown ?? 0) > n
      && !document.getElementById('start').disabled, before, 120_000, other);
    assert.equal(await downloadText(other, '#export-json'), original, 'the rerun gives the same report, byte for byte');
    assert.equal(mixwell('run', '--link', copied, '--json', '-'), original, 'and so does the command line');
    await other.close();
  } finally {
    await session.close();
  }
});

test('opening a link keeps the user\'s own text recoverable', { timeout: 120_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const own = '# my own model, not to be lost\nmu : real\n\ndensity = normal(mu; 1, 2)\n';
    await replaceEditorText(page, own);
    const shared = 'theta : unit\n\ndensity = beta(theta; 3, 4)\n';
    const link = mixwell('link', '-', '--seed', '99', '--draws', '250', '--page', BASE_URL, { input: shared }).trim();
    // Same page, new fragment: the page notices the change of address.
    await page.goto(link);
    await session.waitFor('the shared run to open', () => document.getElementById('link-banner').dataset.kind === 'ok');
    assert.equal(await editorText(page), shared);
    assert.match(await page.textContent('#link-banner'), /previous text is one undo away/);
    await page.click('.cm-content');
    await page.keyboard.press('Control+Z');
    assert.equal(await editorText(page), own, 'undo brings the user\'s text back');
    await page.keyboard.press('Control+Shift+Z');
    assert.equal(await editorText(page), shared);
    await page.getByRole('button', { name: 'Bring back my previous text' }).click();
    assert.equal(await editorText(page), own, 'so does the banner\'s button');
    await page.reload();
    await session.waitFor('the editor after the reload', () => document.getElementById('check-status').dataset.state === 'ok');
    assert.equal(await editorText(page), own, 'and a reload keeps it');
  } finally {
    await session.close();
  }
});

test('a link whose model does not read opens, shows the error, and cannot be started', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    // `mixwell link` refuses such a model, but a link is only text: make one with the page.
    const broken = 'mu : real\ndensity = normal(mu; 0, 1) *\n';
    const link = await page.evaluate(async (model) => {
      const engine = await import('./pkg/mixwell.js');
      await engine.default();
      const { config } = engine.plan_run('mu : real\ndensity = normal(mu; 0, 1)\n', { options: { seed: 12 } });
      return engine.make_link(model, config, location.origin + location.pathname);
    }, broken);
    await page.goto(link);
    await session.waitFor('the shared run to open', () => document.getElementById('link-banner').dataset.kind === 'ok');
    assert.equal(await editorText(page), broken);
    await session.waitFor('the error to show', () => document.getElementById('check-status').dataset.state === 'error');
    assert.equal(await page.isDisabled('#start'), true);
    assert.equal(await page.inputValue('#seed'), '12');
  } finally {
    await session.close();
  }
});

test('damaged, cut-short and oversized links show a clear error and load nothing', { timeout: 120_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const own = 'mu : real\n\ndensity = normal(mu; 0, 1)\n';
    await replaceEditorText(page, own);
    await fillRunForm(page, { seed: 123, draws: 321 });
    const good = mixwell('link', '-', '--seed', '5', '--page', BASE_URL, { input: 'x : positive\ndensity = exponential(x; 2)\n' }).trim();
    const [address, payload] = good.split('#run=mw1.');
    const middle = Math.floor(payload.length / 2);
    const flipped = payload.slice(0, middle) + (payload[middle] === 'Q' ? 'R' : 'Q') + payload.slice(middle + 1);
    const cases = [
      ['damaged', `${address}#run=mw1.${flipped.slice(0, middle)}!!${flipped.slice(middle)}`, /damaged/],
      ['cut short', `${address}#run=mw1.${payload.slice(0, middle)}`, /damaged|cut short/],
      ['oversized', `${address}#run=mw1.${'A'.repeat(61_000)}`, /more than the 60000 accepted/],
      ['not a run', `${address}#run=xx9.${payload}`, /another version of mixwell, or is damaged/],
    ];
    for (const [what, link, message] of cases) {
      await page.goto(link);
      await session.waitFor(`the error for a ${what} link`, () => document.getElementById('link-banner').dataset.kind === 'error');
      const banner = await bannerOf(page);
      assert.equal(banner.hidden, false);
      assert.match(banner.text, /This link could not be opened/, what);
      assert.match(banner.text, message, what);
      assert.match(banner.text, /Nothing was loaded/, what);
      assert.equal(await editorText(page), own, `${what}: the text is untouched`);
      assert.equal(await page.inputValue('#seed'), '123', `${what}: the settings are untouched`);
      assert.equal(await page.inputValue('#draws'), '321', `${what}: the settings are untouched`);
      await page.click('#link-banner button');
      assert.equal((await bannerOf(page)).hidden, true, 'the error can be dismissed');
    }
    // A fresh load of a damaged link behaves the same.
    const fresh = await session.newPage();
    await fresh.goto(cases[1][1]);
    await session.waitFor('the error on a fresh load', () => document.getElementById('link-banner').dataset.kind === 'error', null, 15_000, fresh);
    assert.equal(await editorText(fresh), own);
    await session.screenshot('link-damaged', { on: fresh });
    await fresh.close();
  } finally {
    await session.close();
  }
});

test('model text with HTML or script in it is shown as text', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    // An <img> that loaded would request /x, which the harness fails on; a script that ran would
    // set window.hacked.
    const hostile = '# <img src=x onerror="window.hacked=1"><script>window.hacked=2</script> & <b>bold</b>\n'
      + 'mu : real\n\ndensity = normal(mu; 0, 1)\n';
    const link = mixwell('link', '-', '--seed', '1', '--page', BASE_URL, { input: hostile }).trim();
    await page.goto(link);
    await session.waitFor('the shared run to open', () => document.getElementById('link-banner').dataset.kind === 'ok');
    assert.equal(await editorText(page), hostile, 'the text is shown as written');
    const dom = await page.evaluate(() => ({
      hacked: window.hacked,
      images: [...document.querySelectorAll('img')].map((img) => img.getAttribute('src')),
      scripts: document.querySelectorAll('script').length,
      bold: document.querySelectorAll('b').length,
    }));
    assert.equal(dom.hacked, undefined, 'no script ran');
    assert.deepEqual(dom.images, ['icon.svg'], 'no image element was made from the text');
    assert.equal(dom.scripts, 1, 'no script element was made from the text');
    assert.equal(dom.bold, 0, 'no markup was made from the text');
    await session.screenshot('link-with-html');
  } finally {
    await session.close();
  }
});

test('a model too large for a link is refused with a clear message', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    // Digits that do not compress: a fixed sequence from a linear congruential generator.
    let state = 12345;
    const values = Array.from({ length: 12_000 }, () => {
      state = (state * 1103515245 + 12345) % 2 ** 31;
      return (state / 2 ** 31).toFixed(12);
    });
    await replaceEditorText(page, `y = [${values.join(', ')}]\nmu : real\n\ndensity = normal(y; mu, 1)\n`);
    await session.waitFor('the model to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok', null, 30_000);
    await session.waitFor('the link to be refused', () => /more than the 60000/.test(document.getElementById('share-status').textContent));
    assert.equal(await page.isDisabled('#copy-link'), true, 'nothing to copy');
    assert.match(await page.textContent('#share-status'), /would be [\d,]+ characters long/);
    assert.equal(await page.isDisabled('#start'), false, 'the model can still run');
    await session.screenshot('link-too-long');
  } finally {
    await session.close();
  }
});
