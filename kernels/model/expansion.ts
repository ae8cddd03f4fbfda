// The bound on expanding one state: a single state can have billions of successors (a wide
// `one of`, many choices in one step, a dozen processes), so the state limit and a stop request
// must reach inside the expansion, not only between states.

/** What the explorer allows one call of `Instance.successors`. */
export interface ExpansionBound {
  /** New states the caller can still store; outcome lists are cut near this size and completed only when needed. */
  room: number
  /** The caller stops at the first model error: the expansion may end there too. */
  stopAtError?: boolean
  /** Polled during a long expansion; true abandons it. */
  stop?: () => boolean
  /** Set by `successors` when it abandoned the expansion because `stop` said so. */
  interrupted: boolean
  /**
   * Raised by `successors` to the longest outcome list of one process it used (cut lists count
   * their cut length). The parallel explorer reads it: while every list is shorter than the room,
   * no list is cut and the order of successors does not depend on the room or on the memo.
   */
  widest?: number
}
