// Safe text for messages and tables: names and other strings from input files are shown so that they can
// neither drive the terminal (escape sequences, bell, backspace) nor split a one-line message (newlines).
//
// Unsafe: the C0 and C1 control characters and DEL (Unicode category Cc), the line and paragraph
// separators (U+2028, U+2029: line breaks for some viewers and older JSON readers) and the bidirectional
// formatting characters (U+200E, U+200F, U+202A-U+202E, U+2066-U+2069), which reorder what the reader sees.

const UNSAFE = /[\p{Cc}\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/u;
const UNSAFE_ALL = /[\p{Cc}\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/gu;
/** Same set without tab and newline, for multi-line text whose layout is the program's own. */
const UNSAFE_IN_TEXT = /[\x00-\x08\x0b-\x1f\x7f-\x9f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/gu;

/** True when `s` holds a character that must not reach a terminal raw (see above). */
export function hasUnsafeChars(s: string): boolean {
  return UNSAFE.test(s);
}

/** The first unsafe character of `s` as U+XXXX, or null. */
export function firstUnsafeChar(s: string): string | null {
  const m = UNSAFE.exec(s);
  return m ? codePoint(m[0]) : null;
}

/**
 * A name as it appears in a message or table: unchanged when it is plain printable text, else JSON-style
 * quoted with every unsafe character escaped as \uXXXX (so "A\u001b[2J" prints as that, not as a screen clear).
 */
export function displayName(name: string): string {
  if (!hasUnsafeChars(name)) return name;
  return safeLine(JSON.stringify(name));
}

/** One line of output: every unsafe character, newlines included, escaped as \uXXXX. */
export function safeLine(text: string): string {
  return text.replace(UNSAFE_ALL, (c) => `\\u${hex4(c)}`);
}

/** Multi-line output: keeps newlines and tabs, escapes every other unsafe character as \uXXXX. */
export function safeText(text: string): string {
  return text.replace(UNSAFE_IN_TEXT, (c) => `\\u${hex4(c)}`);
}

/**
 * JSON text with the characters JSON.stringify leaves raw but a terminal acts on (DEL, C1 controls,
 * separators, bidi formatting) escaped as \uXXXX: still valid JSON with the same value (the escaping is safeLine's).
 */
export const safeJson: (json: string) => string = safeLine;

function hex4(c: string): string {
  return c.charCodeAt(0).toString(16).padStart(4, '0');
}

function codePoint(c: string): string {
  return `U+${hex4(c).toUpperCase()}`;
}
