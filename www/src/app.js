// The page: an editor holding a model, checked by the engine as the user types, with what the model
// declares beside it and a gallery of examples. The text is kept in this browser on every change.

import { createEditor, replaceText, showDiagnostic } from './editor.js';
import { checkModel, startEngine, startWorker } from './engine.js';
import { markCurrentExample, showCheck, showEngineFailure, showGallery, showOutline } from './panels.js';
import { loadText, saveText } from './storage.js';

// Long enough not to check on every keystroke of a word, short enough to feel immediate.
const CHECK_DELAY_MS = 250;

const $ = (id) => document.getElementById(id);

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

async function main() {
  const status = $('check-status');
  const outline = $('outline');
  const gallery = $('examples');
  const notice = $('notice');

  // Without the gallery the page still edits and checks the user's own text.
  const examples = await loadExamples().catch((error) => {
    console.error('mixwell: the example models could not be loaded', error);
    notice.textContent = 'The example models could not be loaded.';
    return [];
  });
  const saved = loadText();
  let lastInfo = null;
  let engineReady = false;
  let timer = 0;

  const check = () => {
    if (!engineReady) return;
    const text = view.state.doc.toString();
    let result;
    try {
      result = checkModel(text);
    } catch (error) {
      console.error('mixwell: the engine failed while checking', error);
      showEngineFailure(status, `The engine failed on this text (${error.message}). Your text is kept.`);
      return;
    }
    if (result.ok) lastInfo = result.info;
    showCheck(status, result);
    showDiagnostic(view, result.ok ? null : result.error);
    showOutline(outline, lastInfo, !result.ok);
  };

  const view = createEditor({
    parent: $('editor'),
    // A first visit starts with the first example; after that, whatever the user last had.
    text: saved ?? examples[0]?.source ?? '',
    onChange(text) {
      if (!saveText(text)) notice.textContent = 'This browser is not keeping your text; copy it somewhere safe.';
      markCurrentExample(gallery, examples, text);
      clearTimeout(timer);
      timer = setTimeout(check, CHECK_DELAY_MS);
    },
  });
  if (saved === null) saveText(view.state.doc.toString());

  showGallery(gallery, examples, (example) => {
    const before = view.state.doc.toString();
    if (before === example.source) return;
    const wasAnExample = examples.some((e) => e.source === before);
    replaceText(view, example.source);
    // A chosen example is checked at once, not after the typing delay.
    clearTimeout(timer);
    check();
    notice.textContent = wasAnExample || before.trim() === ''
      ? `Loaded “${example.title}”.`
      : `Loaded “${example.title}”. Your previous text is one undo away (Ctrl+Z).`;
    view.focus();
  });
  markCurrentExample(gallery, examples, view.state.doc.toString());

  const worker = startWorker();
  worker.request('ping').then(
    ({ version }) => showEngineState('ready', `engine ${version} · worker ready`),
    (error) => {
      console.error('mixwell: the engine worker did not answer', error);
      showEngineState('failed', 'worker failed');
    },
  );

  try {
    await startEngine();
  } catch (error) {
    console.error('mixwell: the engine could not start', error);
    showEngineFailure(status, `The engine could not start (${error.message}).`);
    return;
  }
  engineReady = true;
  check();
}

main().catch((error) => {
  console.error('mixwell: the page could not start', error);
  showEngineFailure($('check-status'), `The page could not start (${error.message}).`);
});
