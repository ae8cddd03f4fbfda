// The limits of what a check can express or explore, in one place. The checker refuses a construct
// beyond a limit at its line and column, the instance compiler refuses the same things again (a
// check may override constants), and README.md lists every limit with what the user sees.

/**
 * Every integer value of a model lies in MIN_VALUE..MAX_VALUE (32-bit signed): range bounds,
 * constants, swept values, literals. Values are packed into 32-bit words and run in 32-bit slots.
 */
export const MIN_VALUE = -(2 ** 31)
export const MAX_VALUE = 2 ** 31 - 1

/** The most values a range type may hold: 2^31, so that a packed field needs at most 31 bits. */
export const MAX_RANGE_VALUES = 2 ** 31

/**
 * The most values a variable initialised with `any` may take (each is a separate initial state, per
 * process and per peer entry).
 */
export const MAX_ANY_VALUES = 4096

/** The most constant settings one check may sweep (the product of its `with` ranges). */
export const MAX_SWEEP_ROWS = 10_000

/** The most values one `C in A..B` item of a sweep may list. */
export const MAX_SWEEP_VALUES = 1000

/**
 * The largest instance: processes are bits of 32-bit step and crash masks, and an exhaustive
 * check beyond a dozen processes does not finish anyway. The checker and the instance compiler
 * both use this constant.
 */
export const MAX_PROCESSES = 12

/**
 * The largest instance for a temporal property (not of the form `always P`): the fairness
 * conditions of semantics.md, one per process, one per channel and one for `stable`, share the
 * temporal product's 31 marks with the automaton's acceptance sets; n + n(n-1) + 1 is 26 at n = 5
 * and 37 at n = 6.
 */
export const MAX_TEMPORAL_PROCESSES = 5

/** The most message values (a kind's field-value combinations, summed over kinds) tracked per channel. */
export const MAX_MESSAGE_VALUES = 1 << 16

/**
 * Integer arithmetic is exact up to 2^53 - 1 in magnitude (JavaScript's safe integers). The checker
 * proves from the types that every intermediate value stays within this bound, and refuses an
 * expression at its operator otherwise.
 */
export const MAX_SAFE = Number.MAX_SAFE_INTEGER

/**
 * The longest notebook read, in UTF-16 code units (4 MiB): analysis is linear, but a bigger
 * notebook would still take seconds and hundreds of megabytes in the editor and the checker.
 */
export const MAX_NOTEBOOK_CHARS = 4 * 1024 * 1024

/** The most labels one enum type may list (a range type serves for more values). */
export const MAX_ENUM_LABELS = 100_000

/**
 * The deepest nesting of parentheses, operators, calls, aggregates, quantifiers, `if` and `for`
 * in one block. The parser's own depth guards break far deeper input into spurious errors; this
 * bound keeps every tree well inside them (and the checker's recursion shallow).
 */
export const MAX_NESTING = 100

/** The most diagnostics a notebook reports; the last one says how many more there were. */
export const MAX_DIAGNOSTICS = 1000

/** True when `v` is an integer that a model may hold. */
export function isModelValue(v: number): boolean {
  return Number.isInteger(v) && v >= MIN_VALUE && v <= MAX_VALUE
}

/**
 * The largest number of distinct atoms a formula may use. Nothing in the translation depends on
 * it; it bounds the memory of the product, which keeps a row of ceil(atoms / 32) words per
 * reachable state (8 words, 32 bytes, at the limit).
 */
export const MAX_ATOMS = 256
