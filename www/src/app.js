// The page: an editor holding a model, checked by the engine as the user types; a run form;
// runs driven across Web Workers with progress and a cancel button; the results with plots and
// exports; links that carry a model and its settings. The text and the form are kept in this
// browser on every change, and nothing the user typed is replaced without a way back.

import 'uplot/dist/uPlot.min.css';
import { setupDiagnose } from './diagnose.js';
import { download, h } from './dom.js';
import { createEditor, replaceText, showDiagnostic } from './editor.js';
import { checkModel, defaultSettings, makeLink, readLink, startEngine } from './engine.js';
import { markCurrentExample, showCheck, showEngineFailure, showGallery, showOutline } from './panels.js';
import { progressView } from './progress.js';
import { METHOD_NAMES, showResults } from './results.js';
import { prepareWorkers, startJob } from './runner.js';
import {
  formFromLink, initialValues, planFromConfig, planFromForm, randomSeed, readForm, writeForm,
} from './settings.js';
import {
  loadForm, loadReplacedText, loadText, saveForm, saveReplacedText, saveText,
} from './storage.js';

// Long enough not to check on every keystroke of a word, short enough to feel immediate.
const CHECK_DELAY_MS = 250;

const $ = (id) => document.getElementById(id);

/** What the user's own kernel setting is for, under each tuning method. */
const OWN_SETTING_NOTES = {
  bo: 'Bayesian optimisation searches its own range; your setting is the baseline when methods are compared.',
  rm: 'Robbins–Monro starts from your setting.',
  am: 'Adaptive Metropolis starts from your setting.',
  none: 'The chains sample with exactly this setting.',
};

async function loadExamples() {
  const response = await fetch(new URL('./examples.json', import.meta.url));
  if (!response.ok) throw new Error(`examples.json: ${response.status} ${response.statusText}`);
  return response.json();
}

function showEngineState(state, text) {
  const pill = $('engine-status');
  pill.dataset.state = state;
  pill.textContent = text;
}

/** Keep the masthead's and the caution's heights in CSS variables, for the one-screen layout. */
function trackChromeHeights() {
  const root = document.documentElement;
  const observer = new ResizeObserver(() => {
    root.style.setProperty('--masthead-h', `${document.querySelector('.masthead').offsetHeight}px`);
    root.style.setProperty('--caution-h', `${document.querySelector('.caution').offsetHeight}px`);
    root.style.setProperty('--banner-h', `${document.getElementById('link-banner').offsetHeight}px`);
  });
  observer.observe(document.querySelector('.masthead'));
  observer.observe(document.querySelector('.caution'));
  observer.observe(document.getElementById('link-banner'));
}

async function main() {
  trackChromeHeights();
  const status = $('check-status');
  const outline = $('outline');
  const gallery = $('examples');
  const notice = $('notice');
  const form = $('run-form');
  const startButton = $('start');
  const cancelButton = $('cancel');
  const runStatus = $('run-status');
  const shareStatus = $('share-status');
  const shareField = $('share-link');
  const copyButton = $('copy-link');
  const banner = $('link-banner');
  const resultsArea = $('results');

  // Without the gallery the page still edits and checks the user's own text.
  const examples = await loadExamples().catch((error) => {
    console.error('mixwell: the example models could not be loaded', error);
    notice.textContent = 'The example models could not be loaded.';
    return [];
  });
  const saved = loadText();
  let lastInfo = null;
  let lastCheck = null;
  let engineReady = false;
  let timer = 0;
  let job = null;
  let shownResults = null;
  let finishedRun = null;
  // A run from a link that the form cannot show in full; used until the form changes.
  let pinned = null;
  let link = null;

  const text = () => view.state.doc.toString();

  const check = () => {
    if (!engineReady) return;
    let result;
    try {
      result = checkModel(text());
    } catch (error) {
      console.error('mixwell: the engine failed while checking', error);
      showEngineFailure(status, `The engine failed on this text (${error.message}). Your text is kept.`);
      return;
    }
    lastCheck = result;
    if (result.ok) lastInfo = result.info;
    showCheck(status, result);
    showDiagnostic(view, result.ok ? null : result.error);
    showOutline(outline, lastInfo, !result.ok);
    refresh();
  };

  const view = createEditor({
    parent: $('editor'),
    // A first visit starts with the first example; after that, whatever the user last had.
    text: saved ?? examples[0]?.source ?? '',
    onChange(current) {
      if (!saveText(current)) notice.textContent = 'This browser is not keeping your text; copy it somewhere safe.';
      markCurrentExample(gallery, examples, current);
      showRecover();
      clearTimeout(timer);
      timer = setTimeout(check, CHECK_DELAY_MS);
    },
  });
  if (saved === null) saveText(text());

  // The user's own text, when an example or a link replaces it, is kept (and survives a reload)
  // until the next replacement; the button above the editor brings it back.
  const recoverButton = $('recover');
  const isOwnText = (candidate) => candidate.trim() !== '' && !examples.some((e) => e.source === candidate);
  const keepReplaced = (before) => {
    if (isOwnText(before)) saveReplacedText(before);
  };
  const showRecover = () => {
    const kept = loadReplacedText();
    recoverButton.hidden = kept === null || kept === text();
  };
  recoverButton.addEventListener('click', () => {
    const kept = loadReplacedText();
    if (kept === null) return;
    // A swap: the text now in the editor is kept in turn, if it is the user's own.
    keepReplaced(text());
    replaceText(view, kept);
    clearTimeout(timer);
    check();
    banner.hidden = true;
    view.focus();
  });

  showGallery(gallery, examples, (example) => {
    const before = text();
    if (before === example.source) return;
    const wasAnExample = examples.some((e) => e.source === before);
    keepReplaced(before);
    replaceText(view, example.source);
    // A chosen example is checked at once, not after the typing delay.
    clearTimeout(timer);
    check();
    notice.textContent = wasAnExample || before.trim() === ''
      ? `Loaded “${example.title}”.`
      : `Loaded “${example.title}”. Your previous text is one undo away (Ctrl+Z), and kept: “Bring back your earlier text” above the editor.`;
    view.focus();
  });
  markCurrentExample(gallery, examples, text());
  showRecover();

  // The form: how it looks follows what is chosen; every change is kept.
  const ownNote = $('own-note');
  const defaultsFor = (kind) => defaultSettings(text(), kind).settings;
  const syncForm = () => {
    const values = readForm(form);
    for (const field of form.querySelectorAll('[data-kernel]')) {
      field.hidden = field.dataset.kernel !== values.kernel;
      field.querySelector('input').disabled = !values.own;
    }
    // Robbins–Monro and adaptive Metropolis adapt a random walk only.
    for (const option of form.elements.tuning.options) {
      option.disabled = values.kernel === 'slice' && (option.value === 'rm' || option.value === 'am');
    }
    if (form.elements.tuning.selectedOptions[0]?.disabled) form.elements.tuning.value = 'bo';
    const advanced = form.elements.tuning.value === 'none';
    for (const name of ['trials', 'window', 'score', 'freeze']) form.elements[name].disabled = advanced && !values.compare;
    let defaults = null;
    try {
      // The text may have changed since the last check; then there are no defaults to show yet.
      defaults = lastCheck?.ok ? defaultsFor(values.kernel) : null;
    } catch {
      defaults = null;
    }
    for (const [key, value] of Object.entries(defaults ?? {})) form.elements[key].placeholder = Number(value.toPrecision(4)).toString();
    const method = form.elements.tuning.value;
    ownNote.hidden = !values.own;
    ownNote.textContent = values.own ? OWN_SETTING_NOTES[method] : '';
  };

  // The runs to make: those of the form's options, or of a pinned link's run; built by the engine
  // as `mixwell run` builds them from its flags.
  const currentPlan = () => {
    const values = readForm(form);
    return pinned ? planFromConfig(text(), pinned, values.compare) : planFromForm(text(), values);
  };

  // What can be done now: start, share, or why not.
  const refresh = () => {
    syncForm();
    link = null;
    const running = job !== null;
    cancelButton.disabled = !running;
    let plan = null;
    let problem = null;
    let linkProblem = null;
    if (!engineReady) problem = 'The engine is starting…';
    else if (!lastCheck) problem = 'Reading the model…';
    else if (!lastCheck.ok) {
      const { from } = lastCheck.error;
      problem = `The model has an error at line ${from.line}, column ${from.column} (see under the editor); fix it to run.`;
    } else {
      try {
        plan = currentPlan();
        link = makeLink(text(), plan.config, location.origin + location.pathname);
      } catch (error) {
        // A run the engine refuses cannot start; a model too large for a link still can run.
        if (plan === null) problem = error.message;
        else linkProblem = error.message;
      }
    }
    startButton.disabled = running || problem !== null;
    if (!running) {
      runStatus.textContent = problem ?? '';
      runStatus.dataset.state = problem ? 'problem' : '';
    }
    if (link) {
      shareStatus.textContent = `A link of ${link.length.toLocaleString('en')} characters carries this model and these settings.`;
      shareStatus.dataset.state = '';
      shareField.value = link;
    } else {
      shareStatus.textContent = lastCheck && !lastCheck.ok ? 'No link until the model reads cleanly.'
        : linkProblem ? `No link: ${linkProblem}.` : problem ? `No link: ${problem}` : 'No link yet.';
      shareStatus.dataset.state = linkProblem ? 'problem' : '';
      shareField.value = '';
    }
    copyButton.disabled = link === null;
  };

  form.addEventListener('input', (event) => {
    if (event.target.name === 'own' && event.target.checked && lastCheck?.ok) {
      // Start the user's own setting from the default, so there is something to edit.
      try {
        const defaults = defaultsFor(readForm(form).kernel);
        for (const [key, value] of Object.entries(defaults)) {
          if (form.elements[key].value.trim() === '') form.elements[key].value = String(value);
        }
      } catch {
        // The text does not read just now; the fields stay empty for the user to fill.
      }
    }
    pinned = null;
    saveForm(readForm(form));
    refresh();
  });
  $('new-seed').addEventListener('click', () => {
    form.elements.seed.value = String(randomSeed());
    form.dispatchEvent(new Event('input'));
  });

  copyButton.addEventListener('click', async () => {
    if (!link) return;
    const length = link.length.toLocaleString('en');
    try {
      await navigator.clipboard.writeText(link);
      shareStatus.textContent = `Copied a link of ${length} characters.`;
    } catch {
      shareField.focus();
      shareField.select();
      shareStatus.textContent = `This browser would not copy it for the page: the link (${length} characters) is selected — press Ctrl+C.`;
    }
  });

  // Runs.
  const onExport = (kind) => {
    if (!finishedRun) return;
    if (kind === 'csv') download('mixwell-draws.csv', finishedRun.csv, 'text/csv');
    else download('mixwell-report.json', finishedRun.json, 'application/json');
  };

  const start = async (source, { runs, chosen }) => {
    if (job) return;
    const progress = progressView($('progress'), runs);
    runStatus.textContent = '';
    delete runStatus.dataset.state;
    resultsArea.classList.add('stale');
    job = startJob({ source, runs, chosen, onProgress: (p) => progress.update(p) });
    refresh();
    let outcome = null;
    let seconds = 0;
    let failure = null;
    try {
      outcome = await job.done;
      seconds = progress.end(outcome.cancelled ? 'Stopped — showing the draws made so far' : 'Finished');
    } catch (error) {
      progress.end('Failed');
      failure = error;
    } finally {
      job = null;
      resultsArea.classList.remove('stale');
      refresh();
      // Workers for the next run in place of any that were stopped, once the results are drawn.
      setTimeout(prepare, 500);
    }
    if (failure) {
      runStatus.textContent = `The run could not go on: ${failure.message}`;
      runStatus.dataset.state = 'problem';
    }
    if (!outcome) return;
    shownResults?.destroy();
    finishedRun = outcome.finished;
    resultsArea.hidden = false;
    shownResults = showResults(resultsArea, outcome.finished, { ...outcome, seconds, onExport });
    // How long the job took from start to its last answer (rendering aside), for benchmarks.
    resultsArea.dataset.seconds = String(seconds);
    // A counter of results shown, so that anyone waiting for new results can tell them apart.
    resultsArea.dataset.shown = String(Number(resultsArea.dataset.shown ?? 0) + 1);
    if (outcome.interrupted) {
      runStatus.textContent = `A chain stopped unexpectedly (${outcome.interrupted}). The run was ended; the results below use the draws made so far and are marked incomplete.`;
      runStatus.dataset.state = 'problem';
    } else if (outcome.cancelled) {
      runStatus.textContent = 'Stopped. The chains were ended; the results below are marked incomplete.';
    }
    resultsArea.scrollIntoView({ behavior: 'smooth', block: 'start' });
  };

  form.addEventListener('submit', (event) => {
    event.preventDefault();
    // Text typed within the checking delay is checked now, so that what runs is what is shown.
    clearTimeout(timer);
    check();
    if (startButton.disabled) return;
    start(text(), currentPlan());
  });
  cancelButton.addEventListener('click', () => {
    if (!job) return;
    job.cancel();
    runStatus.textContent = 'Stopping…';
  });

  // A link in the address: restore its model and settings, keeping the user's text recoverable.
  const showBanner = (kind, ...content) => {
    banner.dataset.kind = kind;
    const close = h('button', { type: 'button', className: 'quiet', title: 'Dismiss' }, 'Dismiss');
    close.addEventListener('click', () => {
      banner.hidden = true;
    });
    banner.replaceChildren(h('div', { className: 'banner-body' }, ...content), close);
    banner.hidden = false;
  };
  const button = (label, onClick, className = 'quiet') => {
    const b = h('button', { type: 'button', className }, label);
    b.addEventListener('click', onClick);
    return b;
  };
  const openLink = () => {
    if (!/(^#|&)run=/.test(location.hash)) return;
    const address = location.href;
    // The link is consumed: a reload afterwards keeps whatever the user does next.
    history.replaceState(null, '', location.pathname + location.search);
    let shared;
    try {
      shared = readLink(address);
    } catch (error) {
      const why = error.message.charAt(0).toUpperCase() + error.message.slice(1);
      showBanner('error', h('strong', {}, 'This link could not be opened. '), `${why}. `,
        'Nothing was loaded: your model and settings are as they were.');
      return;
    }
    const before = text();
    const replaced = before !== shared.model;
    if (replaced) {
      keepReplaced(before);
      replaceText(view, shared.model);
      clearTimeout(timer);
      check();
    }
    const { values, fits } = formFromLink(shared);
    writeForm(form, { compare: false, ...values });
    saveForm(readForm(form));
    pinned = fits ? null : shared.run;
    refresh();
    const run = shared.run;
    const what = `${run.chains} chain${run.chains === 1 ? '' : 's'} × ${run.draws.toLocaleString('en')} draws, `
      + `${METHOD_NAMES[run.tuning.method].replace(/ \(.*\)$/, '')}${run.tuning.method === 'none' ? '' : ' tuning'}, seed ${run.seed}`;
    showBanner('ok',
      h('strong', {}, 'Opened a shared run. '),
      `The model and settings (${what}) are in place${replaced ? '; your previous text is one undo away' : ''}. `,
      'Running it again gives the same draws, to the last digit.',
      h('span', { className: 'banner-actions' },
        button('Run it now', () => {
          banner.hidden = true;
          form.requestSubmit();
        }, 'primary'),
        replaced && isOwnText(before) ? button('Bring back my previous text', () => {
          recoverButton.click();
        }) : null),
      fits ? null : h('span', { className: 'banner-note' }, ' Some of its settings cannot be shown in the form; they are used until you change the form.'));
  };
  window.addEventListener('hashchange', () => {
    if (engineReady) openLink();
  });

  // Workers with the engine loaded, waiting for the first run.
  const prepare = () => prepareWorkers().then(
    (version) => showEngineState('ready', `engine ${version} · worker ready`),
    (error) => {
      console.error('mixwell: the engine workers did not answer', error);
      showEngineState('failed', 'worker failed');
    },
  );
  prepare();

  try {
    await startEngine();
  } catch (error) {
    console.error('mixwell: the engine could not start', error);
    showEngineFailure(status, `The engine could not start (${error.message}).`);
    return;
  }
  engineReady = true;
  setupDiagnose({ card: $('draws-card'), resultsArea });
  writeForm(form, { ...initialValues(), ...(loadForm() ?? {}) });
  check();
  openLink();
  refresh();
}

// Keep the page's files for offline use (www/sw.js); without it the page works as long as it is online.
if ('serviceWorker' in navigator) {
  navigator.serviceWorker.register(new URL('../sw.js', import.meta.url)).catch((error) => {
    console.info('mixwell: the page will not work offline here', error);
  });
}

main().catch((error) => {
  console.error('mixwell: the page could not start', error);
  showEngineFailure($('check-status'), `The page could not start (${error.message}).`);
});
