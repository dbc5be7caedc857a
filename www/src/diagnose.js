// Draws from any sampler, judged in the page: CSV files opened with the button or dropped anywhere
// on the page are read in a Web Worker by the engine — the same reading and report as
// `mixwell diagnose` — and shown in the results view. The files never leave the browser.

import { download } from './dom.js';
import { engineModule, startEngine, startWorker } from './engine.js';
import { showDiagnosis } from './results.js';
import { LAGS } from './runner.js';

/** Most bytes of CSV judged at once (the engine's MAX_PAGE_CSV_BYTES); the command line has no limit. */
const MAX_BYTES = 256 * 1024 * 1024;

const sizeText = (bytes) => (bytes < 1024 * 1024 ? `${Math.max(1, Math.round(bytes / 1024))} KB` : `${(bytes / (1024 * 1024)).toFixed(1)} MB`);

/**
 * Wire the card of controls `card` (the drop zone #drop-zone, #draws-files, #draws-layout,
 * #draws-truncate and #draws-status) and the page's drop target to show results in
 * `resultsArea`.
 */
export function setupDiagnose({ card, resultsArea }) {
  const input = card.querySelector('#draws-files');
  const status = card.querySelector('#draws-status');
  const zone = card.querySelector('#drop-zone');
  let worker = null;
  let busy = false;
  let json = null;

  const say = (text, state = '') => {
    status.textContent = text;
    status.dataset.state = state;
  };

  const judge = async (files) => {
    if (busy || files.length === 0) return;
    const total = files.reduce((sum, f) => sum + f.size, 0);
    const names = files.map((f) => f.name).join(', ');
    if (total > MAX_BYTES) {
      say(`${names}: ${sizeText(total)} is more than the page judges at once (${sizeText(MAX_BYTES)}); `
        + 'the command line, mixwell diagnose, reads files of any size.', 'problem');
      return;
    }
    busy = true;
    card.dataset.busy = 'true';
    say(`Reading ${names} (${sizeText(total)}) in this browser…`);
    const started = performance.now();
    try {
      // The formatter of the results view runs on this thread's engine; the worker gets the
      // compiled module so that it need not compile its own.
      await startEngine();
      worker ??= startWorker('./diagnose-worker.js', 'mixwell-diagnose');
      const options = {
        layout: card.querySelector('#draws-layout').value === 'auto' ? null : card.querySelector('#draws-layout').value,
        truncate: card.querySelector('#draws-truncate').checked,
      };
      const answer = await worker.request('diagnose', { module: await engineModule(), files, options, lags: LAGS });
      const seconds = (performance.now() - started) / 1000;
      const { diagnosed } = answer;
      json = diagnosed.json;
      const { report } = diagnosed;
      resultsArea.hidden = false;
      showDiagnosis(resultsArea, diagnosed, {
        seconds,
        onExport: () => download('mixwell-diagnosis.json', json, 'application/json'),
      });
      resultsArea.dataset.shown = String(Number(resultsArea.dataset.shown ?? 0) + 1);
      say(`Judged ${names}: ${report.chains} chain${report.chains === 1 ? '' : 's'} × ${report.draws.toLocaleString('en')} draws `
        + `of ${report.quantities.length} quantit${report.quantities.length === 1 ? 'y' : 'ies'}, results below.`, 'ok');
      resultsArea.scrollIntoView({ behavior: 'smooth', block: 'start' });
    } catch (error) {
      // A worker that failed is replaced for the next files.
      if (!/error: /.test(error.message)) {
        worker?.stop();
        worker = null;
      }
      say(error.message, 'problem');
    } finally {
      busy = false;
      delete card.dataset.busy;
      input.value = '';
    }
  };

  // The zone, its button included, opens the file chooser.
  zone.addEventListener('click', () => input.click());
  input.addEventListener('change', () => judge([...input.files]));

  // Files dropped anywhere on the page are judged (and never opened by the browser in place of
  // the page); text dragged into the editor is left to the editor.
  const carriesFiles = (event) => [...(event.dataTransfer?.types ?? [])].includes('Files');
  let depth = 0;
  const dragging = (on) => document.body.classList.toggle('dragging-files', on);
  window.addEventListener('dragenter', (event) => {
    if (!carriesFiles(event)) return;
    depth += 1;
    dragging(true);
  });
  window.addEventListener('dragleave', (event) => {
    if (!carriesFiles(event)) return;
    depth = Math.max(0, depth - 1);
    if (depth === 0) dragging(false);
  });
  window.addEventListener('dragover', (event) => {
    if (!carriesFiles(event)) return;
    event.preventDefault();
    event.dataTransfer.dropEffect = 'copy';
  }, true);
  window.addEventListener('drop', (event) => {
    if (!carriesFiles(event)) return;
    event.preventDefault();
    event.stopPropagation();
    depth = 0;
    dragging(false);
    judge([...event.dataTransfer.files]);
  }, true);
  zone.addEventListener('keydown', (event) => {
    if (event.key === 'Enter' || event.key === ' ') {
      event.preventDefault();
      input.click();
    }
  });
}
