/**
 * Text people type into names and labels carries no control characters: NUL and the other C0
 * controls (U+0000 to U+001F), DEL (U+007F) and the C1 controls (U+0080 to U+009F) (Unicode
 * Standard, General Category Cc). They print as nothing or break files and terminals that show the
 * text later (CSV, PDF, logs). Longer free text (descriptions, notes, comments) may keep line breaks
 * and tabs, nothing else.
 */

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
// eslint-disable-next-line no-control-regex
const CONTROL_BUT_LINES = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

/** True when a one-line name or label has no control character. */
export const isPlainLine = (text: string): boolean => !CONTROL.test(text);

/** True when free text has no control character other than line breaks and tabs. */
export const isPlainText = (text: string): boolean => !CONTROL_BUT_LINES.test(text);

export const PLAIN_LINE_MESSAGE = 'may not contain control characters (such as NUL or a line break)';
export const PLAIN_TEXT_MESSAGE = 'may not contain control characters other than line breaks and tabs';
