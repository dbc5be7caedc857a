// The page in headless Chromium: it loads and checks the first example, underlines an error where
// the engine says it is, keeps the text across a reload, lets the user pick an example (and undo
// it), answers from its worker, and fits both a laptop screen and a phone.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import {
  crateVersion, downloadText, editorText, exampleFiles, fillRunForm, openChecked, replaceEditorText, runAndWait,
} from './harness.mjs';

// Declarations `name : support` in model text, read with a regular expression here rather than by
// the engine, so that the page's list is checked against the file itself.
function declaredParameters(source) {
  return [...source.matchAll(/^\s*([A-Za-z_]\w*)\s*:\s*([^#\n]*?)\s*(?:#.*)?$/gm)].map(([, name, support]) => ({ name, support }));
}

const statusOf = (page) => page.$eval('#check-status', (el) => ({ state: el.dataset.state, line: el.dataset.line, text: el.textContent }));

test('the page loads the first example and lists its parameters', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const [first] = exampleFiles();
    assert.equal(await editorText(page), first.source, `the editor holds examples/${first.file}`);
    const expected = declaredParameters(first.source);
    assert.ok(expected.length > 0 && expected.every((p) => !p.support.includes('[')),
      `examples/${first.file} should declare scalar parameters only, for this test`);

    // Depends on the model checker (model::check): until it lands, the check reports an error.
    await session.waitFor('the model to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok');
    const rows = await page.$$eval('#outline table.parameters tbody tr', (trs) =>
      trs.map((tr) => [...tr.cells].map((td) => td.textContent)));
    assert.deepEqual(rows, expected.map((p) => [p.name, p.support, '1']));
    assert.match((await statusOf(page)).text, new RegExp(`${expected.length} parameters`));
    await session.screenshot('loaded-1280x800');
  } finally {
    await session.close();
  }
});

test('an edit that breaks line 3 is reported and underlined on line 3', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const broken = 'rise = [212, 198 225, 240]';
    // Select line 3 and type over it, as a user would.
    await page.click('.cm-content .cm-line:nth-child(3)');
    await page.keyboard.press('Home');
    await page.keyboard.press('Shift+End');
    await page.keyboard.type(broken, { delay: 10 });
    await session.waitFor('an error on line 3', () => {
      const status = document.getElementById('check-status');
      return status.dataset.state === 'error' && status.dataset.line === '3';
    });
    const status = await statusOf(page);
    assert.match(status.text, /Line 3, column \d+/);
    const column = Number(status.text.match(/Line 3, column (\d+)/)[1]);

    const underline = await page.$eval('.cm-lintRange-error', (mark) => {
      const line = mark.closest('.cm-line');
      const lines = [...line.parentElement.querySelectorAll(':scope > .cm-line')];
      const range = document.createRange();
      range.setStart(line, 0);
      range.setEndBefore(mark);
      return { lineNumber: lines.indexOf(line) + 1, text: mark.textContent, before: range.toString() };
    });
    assert.equal(underline.lineNumber, 3, 'the underline is on line 3');
    assert.ok(underline.text.length > 0, 'the underline covers some text');
    // The reported column (1-based, in characters) is where the underline starts.
    assert.equal(underline.before.length + 1, column);
    assert.ok(broken.includes(underline.text));

    // Hovering the underline shows the message.
    await page.hover('.cm-lintRange-error');
    await session.waitFor('the error tooltip', () => document.querySelector('.cm-tooltip-lint') !== null);
    const tooltip = await page.$eval('.cm-tooltip-lint', (el) => el.textContent);
    const firstLine = status.text.replace(/^✕\s*Line 3, column \d+: /, '').split(/Expected |Hint: /)[0].trim();
    assert.ok(tooltip.includes(firstLine), `tooltip ${JSON.stringify(tooltip)} shows ${JSON.stringify(firstLine)}`);
    await session.screenshot('error-on-line-3');
  } finally {
    await session.close();
  }
});

test('underlines land on the right characters after non-ASCII text', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    // The bee is two UTF-16 units and four bytes; ï is one unit and two bytes. Offsets from the
    // engine are bytes, the editor counts UTF-16 units: a wrong conversion moves the underline.
    await replaceEditorText(page, '# naïve 🐝 hives\nmu : real\nsigma : positve\n\ndensity = normal(mu; 0, sigma)\n');
    await session.waitFor('an error on line 3', () => document.getElementById('check-status').dataset.line === '3');
    assert.equal(await page.$eval('.cm-lintRange-error', (el) => el.textContent), 'positve');
    assert.match((await statusOf(page)).text, /Line 3, column 9: /);
  } finally {
    await session.close();
  }
});

test('every error of the text is underlined, and a warning is marked apart', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await replaceEditorText(page, 'mu : real\nsigma : positve\ndensity = normal(mu; 0, 1) * nromal(mu; 0, 1)\n');
    await session.waitFor('an error on line 2', () => document.getElementById('check-status').dataset.line === '2');
    const marks = await page.$$eval('.cm-lintRange-error', (els) => els.map((el) => el.textContent));
    assert.deepEqual(marks, ['positve', 'nromal']);
    assert.match((await statusOf(page)).text, /1 more error further on/);
    // A model that reads, with an intermediate nothing uses: a warning, not an error.
    await replaceEditorText(page, 'mu : real\nextra = mu * 2\ndensity = normal(mu; 0, 1)\n');
    await session.waitFor('the model to read', () => document.getElementById('check-status').dataset.state === 'ok');
    assert.equal(await page.$eval('.cm-lintRange-warning', (el) => el.textContent), 'extra');
    assert.equal(await page.$$eval('.cm-lintRange-error', (els) => els.length), 0);
    assert.match((await statusOf(page)).text, /1 warning, underlined/);
  } finally {
    await session.close();
  }
});

test('the edited text survives a reload', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await page.click('.cm-content .cm-line:nth-child(1)');
    await page.keyboard.press('Control+Home');
    await page.keyboard.type('# kept across reloads, ça va 🐝\n', { delay: 5 });
    const edited = await editorText(page);
    assert.ok(edited.startsWith('# kept across reloads'));
    await page.reload();
    await session.waitFor('the editor after the reload', () => document.querySelector('.cm-content .cm-line') !== null);
    assert.equal(await editorText(page), edited);
  } finally {
    await session.close();
  }
});

test('picking an example replaces the text, and undo brings the text back', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const own = 'mu : real\n\ndensity = normal(mu; 0, 1)\n';
    await replaceEditorText(page, own);
    const target = exampleFiles().find((e) => e.file === 'river_gauge.mw') ?? exampleFiles().at(-1);
    const id = target.file.replace(/\.mw$/, '');
    // The story is the file's first line, a `# ` comment, perhaps "Title: story".
    const story = target.source.split('\n')[0].replace(/^# /, '');
    const button = page.locator(`button[data-example="${id}"]`);
    const shown = (await button.textContent()).toLowerCase();
    for (const part of story.split(/:\s+/)) {
      assert.ok(shown.includes(part.toLowerCase()), `the gallery shows ${JSON.stringify(part)}`);
    }
    await button.click();
    assert.equal(await editorText(page), target.source);
    assert.equal(await button.getAttribute('aria-current'), 'true');
    assert.match(await page.textContent('#notice'), /undo/);
    await session.screenshot('example-picked');
    await page.keyboard.press('Control+Z');
    assert.equal(await editorText(page), own);
    assert.equal(await button.getAttribute('aria-current'), null);
  } finally {
    await session.close();
  }
});

test('text replaced by an example can be brought back, even after a reload', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    assert.equal(await page.isHidden('#recover'), true, 'nothing to bring back at first');
    const own = '# mine\nmu : real\n\ndensity = normal(mu; 3, 1)\n';
    await replaceEditorText(page, own);
    await page.click('button[data-example="orchard"]');
    await page.reload();
    await session.waitFor('the page after the reload', () => document.getElementById('check-status').dataset.state === 'ok');
    assert.equal(await editorText(page), exampleFiles().find((e) => e.file === 'orchard.mw').source);
    await page.click('#recover');
    assert.equal(await editorText(page), own, 'the user\'s text is back');
    // The example it replaced was not the user's, so there is nothing further to bring back.
    assert.equal(await page.isHidden('#recover'), true);
  } finally {
    await session.close();
  }
});

test('the engine worker answers a ping and a check', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const version = crateVersion();
    await session.waitFor('the worker to answer', () => document.getElementById('engine-status').dataset.state === 'ready');
    assert.equal(await page.textContent('#engine-status'), `engine ${version} · worker ready`);

    // A worker of our own, speaking the same messages as the page's.
    const source = 'mu : real\nsigma : positve\n';
    const answers = await page.evaluate(async (source) => {
      const worker = new Worker(new URL('pkg/worker.js', document.baseURI), { type: 'module' });
      const ask = (message) => new Promise((resolve) => {
        worker.addEventListener('message', function onMessage({ data }) {
          if (data.id !== message.id) return;
          worker.removeEventListener('message', onMessage);
          resolve(data);
        });
        worker.postMessage(message);
      });
      const result = [
        await ask({ id: 1, kind: 'ping' }),
        await ask({ id: 2, kind: 'check', source }),
        await ask({ id: 3, kind: 'juggle' }),
      ];
      worker.terminate();
      return result;
    }, source);
    assert.deepEqual(answers[0], { id: 1, kind: 'pong', version });
    assert.equal(answers[1].kind, 'checked');
    assert.equal(answers[1].result.ok, false);
    assert.deepEqual(answers[1].result.error.from, { line: 2, column: 9 });
    const at = source.indexOf('positve');
    assert.deepEqual([answers[1].result.error.start, answers[1].result.error.end], [at, at + 'positve'.length]);
    assert.equal(answers[2].kind, 'failed');
    assert.match(answers[2].message, /unknown request kind "juggle"/);
  } finally {
    await session.close();
  }
});

test('the page fits a laptop screen and a phone, with the caution in view', { timeout: 90_000 }, async () => {
  for (const viewport of [{ width: 1280, height: 800 }, { width: 390, height: 844 }]) {
    const session = await openChecked({ viewport });
    try {
      const { page } = session;
      const layout = await page.evaluate(() => {
        const caution = document.querySelector('.caution').getBoundingClientRect();
        return {
          overflowX: document.documentElement.scrollWidth > window.innerWidth,
          pageScrolls: document.documentElement.scrollHeight > window.innerHeight,
          cautionInView: caution.top >= 0 && caution.bottom <= window.innerHeight,
          cautionText: document.querySelector('.caution').textContent,
        };
      });
      assert.equal(layout.overflowX, false, `no sideways scrolling at ${viewport.width}px`);
      assert.match(layout.cautionText, /never prove convergence/);
      assert.match(layout.cautionText, /qualified statistician/);
      if (viewport.width >= 880) {
        assert.equal(layout.pageScrolls, false, 'on a laptop the page is one screen');
        assert.equal(layout.cautionInView, true, 'on a laptop the caution is in view without scrolling');
      }
      await session.screenshot(`layout-${viewport.width}x${viewport.height}`);
      if (viewport.width < 880) {
        await page.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
        await session.screenshot(`layout-${viewport.width}x${viewport.height}-end`);
      }
    } finally {
      await session.close();
    }
  }
});

test('the run settings survive a reload, and a new seed can be drawn', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const chosen = { kernel: 'slice', tuning: 'none', own: true, width: '4.5', stepout: '7', chains: '3', draws: '777', warmup: '55', seed: '9876543210', compare: true, trials: '12', window: '34', score: 'acf', freeze: 'mixture', pilot: '66' };
    await fillRunForm(page, chosen);
    const read = () => page.evaluate(() => {
      const form = document.getElementById('run-form');
      const out = { kernel: form.querySelector('input[name="kernel"]:checked').value };
      for (const name of ['tuning', 'width', 'stepout', 'chains', 'draws', 'warmup', 'seed', 'trials', 'window', 'score', 'freeze', 'pilot']) out[name] = form.elements[name].value;
      for (const name of ['own', 'compare']) out[name] = form.elements[name].checked;
      return out;
    });
    const before = await read();
    assert.deepEqual(before, chosen);
    await page.reload();
    await session.waitFor('the page after the reload', () => document.getElementById('check-status').dataset.state === 'ok');
    assert.deepEqual(await read(), before);
    // Slice sampling cannot be adapted by Robbins–Monro or adaptive Metropolis.
    const disabled = await page.$$eval('#tuning option:disabled', (options) => options.map((o) => o.value));
    assert.deepEqual(disabled, ['rm', 'am']);
    await page.click('#new-seed');
    const seed = await page.inputValue('#seed');
    assert.notEqual(seed, chosen.seed, 'a new seed');
    assert.ok(/^\d+$/.test(seed) && Number(seed) <= Number.MAX_SAFE_INTEGER, `a whole number below 2^53, not ${seed}`);
    await fillRunForm(page, { seed: '9007199254740992' });
    assert.match(await page.textContent('#run-status'), /seed/i, 'a seed of 2^53 is refused');
    assert.equal(await page.isDisabled('#start'), true);
  } finally {
    await session.close();
  }
});

test('with results shown the page fits a laptop screen and a phone, the caution always in view', { timeout: 180_000 }, async () => {
  for (const viewport of [{ width: 1280, height: 800 }, { width: 390, height: 844 }]) {
    const session = await openChecked({ viewport });
    try {
      const { page } = session;
      await fillRunForm(page, { kernel: 'rwm', tuning: 'bo', chains: 4, draws: 400, warmup: 100, trials: 10, window: 40, seed: 8 });
      await runAndWait(session);
      const name = `results-${viewport.width}x${viewport.height}`;
      for (const [where, y] of [['top', 0], ['middle', 0.5], ['end', 1]]) {
        await page.evaluate((share) => window.scrollTo(0, share * (document.documentElement.scrollHeight - window.innerHeight)), y);
        await page.waitForTimeout(200);
        const layout = await page.evaluate(() => {
          const caution = document.querySelector('.caution').getBoundingClientRect();
          return {
            overflowX: document.documentElement.scrollWidth > window.innerWidth,
            cautionInView: caution.top >= 0 && caution.bottom <= window.innerHeight + 0.5,
          };
        });
        assert.equal(layout.overflowX, false, `no sideways scrolling at ${viewport.width}px (${where})`);
        assert.equal(layout.cautionInView, true, `the caution is in view at ${viewport.width}px (${where})`);
        await session.screenshot(`${name}-${where}`);
      }
    } finally {
      await session.close();
    }
  }
});

test('once loaded, the page works offline: a run starts, and a reload still opens it', { timeout: 180_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    // The service worker keeps the page's files once it controls the page.
    await session.waitFor('the service worker to control the page', () => navigator.serviceWorker?.controller !== null, null, 30_000);
    await session.setOffline(true);
    await fillRunForm(page, { kernel: 'rwm', tuning: 'bo', chains: 2, draws: 200, warmup: 100, trials: 6, window: 30, seed: 4 });
    await runAndWait(session);
    assert.equal(JSON.parse(await downloadText(page, '#export-json')).complete, true);
    await page.reload();
    await session.waitFor('the page to load offline', () => document.getElementById('check-status').dataset.state === 'ok', null, 30_000);
    await runAndWait(session);
    await session.setOffline(false);
  } finally {
    await session.close();
  }
});
