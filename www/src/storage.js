// The model text kept in this browser (localStorage), so that it survives a reload. Storage can be
// switched off or full; then the page still works and says the text is not being kept.

const KEY = 'mixwell.model-text.v1';

/** The saved text, or null when there is none or storage cannot be read. */
export function loadText() {
  try {
    return localStorage.getItem(KEY);
  } catch {
    return null;
  }
}

/** Save the text; false when this browser would not keep it. */
export function saveText(text) {
  try {
    localStorage.setItem(KEY, text);
    return true;
  } catch {
    return false;
  }
}
