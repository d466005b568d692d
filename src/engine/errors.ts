import { UserError } from '../model/errors.js';

/**
 * A change was based on a revision that is no longer the latest: someone else
 * saved in between. Nothing was written. Exit status 2 like other refusals;
 * the fields let a face say more or offer to rebase.
 */
export class ConflictError extends UserError {
  constructor(
    readonly loop: string,
    readonly base: number,
    readonly head: number,
    readonly headAuthor: string,
    readonly headTime: string,
    headNote: string,
  ) {
    const note = headNote === '' ? '' : ` ("${headNote}")`;
    super(
      `conflict: ${loop} has changed since revision ${base}: revision ${head} was saved by ${headAuthor} at ${headTime}${note}; ` +
        `nothing was written; look at 'loopledger log ${loop}', redo your change on revision ${head}, or force it`,
    );
    this.name = 'ConflictError';
  }
}
