// Numbers in the page's tables, written exactly as the command line writes them: the rule lives
// once, in Rust (crate/src/report/text.rs), and the page calls it through the engine, which must
// have started (engine.js, startEngine) before anything is formatted.

import { format_fixed, format_significant } from '../pkg/mixwell.js';

// The report's JSON carries an undefined diagnostic (NaN, ±∞) as null.
const asNumber = (value) => (typeof value === 'number' ? value : NaN);

/** `value` to `digits` significant digits (four in the summary), or — when it is not a number. */
export const num = (value, digits = 4) => format_significant(asNumber(value), digits);

/** `value` to `decimals` decimals (ESS whole, R-hat to three), or — when it is not a finite number. */
export const fixed = (value, decimals) => format_fixed(asNumber(value), decimals);
