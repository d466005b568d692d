/** Rows as the store holds them: plain columns, JSON kept as text. */

export interface MachineRow {
  readonly name: string;
  readonly unit: 'hz' | 'rad';
  readonly created_at: string;
}

export interface AxisRow {
  readonly id: number;
  readonly name: string;
  readonly note: string;
  readonly author: string;
  readonly created_at: string;
}

export interface LoopRow {
  readonly id: number;
  readonly axis_id: number;
  /** Name of the loop's axis (joined). */
  readonly axis: string;
  readonly name: string;
  readonly inner_loop_id: number | null;
  readonly sample_rate_hz: number | null;
}

/** A revision without its state. */
export interface RevisionHeadRow {
  readonly loop_id: number;
  readonly number: number;
  readonly parent: number | null;
  readonly kind: string;
  readonly author: string;
  readonly created_at: string;
  readonly note: string;
  readonly summary: string;
  readonly state_hash: string;
  readonly dynamics_hash: string;
  /** Input hash of the result computed with the save (NULL: none was, e.g. older revisions of a loaded dump). */
  readonly check_hash: string | null;
}

/** A revision as read back: with the status of the result computed with its save, when there is one. */
export interface RevisionReadRow extends RevisionHeadRow {
  /** `result.status` of (loop, number, check_hash); null without one. */
  readonly status_then: string | null;
}

export interface RevisionRow extends RevisionHeadRow {
  readonly state_json: string;
}

/** A stored revision with its state, as read back. */
export interface RevisionStateRow extends RevisionReadRow {
  readonly state_json: string;
}

export interface ResultRow {
  readonly loop_id: number;
  readonly revision: number;
  readonly input_hash: string;
  readonly status: string;
  readonly result_json: string;
  readonly computed_at: string;
}
