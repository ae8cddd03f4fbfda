// The text of something thrown, for a note or a message: an Error's message, anything else as
// written. Every stage that turns a caught failure into a sentence uses this one rule.

/** The message of `e` when it is an Error, else `String(e)`. */
export function errorText(e: unknown): string {
  return e instanceof Error ? e.message : String(e)
}
