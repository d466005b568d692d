/** What every command receives: where to write and which store to use. No numerics, no SQL. */
export interface CommandContext {
  /** Store path from --store, else LOOPLEDGER_STORE, else ./loopledger.db. */
  readonly storePath: string;
  /** True when --store or LOOPLEDGER_STORE named the store explicitly. */
  readonly storeGiven: boolean;
  readonly out: (text: string) => void;
  readonly err: (text: string) => void;
  /** True when both stdin and stdout are terminals (never prompt otherwise). */
  readonly interactive: boolean;
  readonly noColor: boolean;
}

/** One command: parse its own arguments (after the command word), do the work, return the exit status. */
export interface CommandModule {
  run(args: string[], ctx: CommandContext): Promise<number>;
}
