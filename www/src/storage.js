// What this browser keeps (localStorage) so that it survives a reload: the model text, the run
// form, and the user's text that an example or a shared link replaced. Storage can be switched off or full; then the page
// still works and says the text is not being kept.

const KEYS = {
  text: 'mixwell.model-text.v1',
  form: 'mixwell.run-form.v1',
  replaced: 'mixwell.replaced-text.v1',
};

function load(key) {
  try {
    return localStorage.getItem(key);
  } catch {
    return null;
  }
}

function save(key, value) {
  try {
    if (value === null) localStorage.removeItem(key);
    else localStorage.setItem(key, value);
    return true;
  } catch {
    return false;
  }
}

/** The saved text, or null when there is none or storage cannot be read. */
export const loadText = () => load(KEYS.text);
/** Save the text; false when this browser would not keep it. */
export const saveText = (text) => save(KEYS.text, text);

/** The saved run form (an object of strings and booleans), or null. */
export function loadForm() {
  try {
    const value = JSON.parse(load(KEYS.form));
    return value !== null && typeof value === 'object' ? value : null;
  } catch {
    return null;
  }
}
export const saveForm = (values) => save(KEYS.form, JSON.stringify(values));

/** The user's text from before an example or a shared link replaced it, or null. */
export const loadReplacedText = () => load(KEYS.replaced);
export const saveReplacedText = (text) => save(KEYS.replaced, text);
